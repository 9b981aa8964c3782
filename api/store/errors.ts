/**
 * Errors every store adapter throws in the same situations, so routes can map them to
 * problems without knowing the adapter.
 *
 * @module
 */

/** `updateRun` named a run that does not exist. */
export class RunNotFoundError extends Error {
  constructor(readonly runId: string) {
    super(`Cannot update run: no run with id "${runId}"`);
    this.name = "RunNotFoundError";
  }
}

/** `updateRun` would change a run whose state is terminal: terminal states never change. */
export class TerminalRunError extends Error {
  constructor(readonly runId: string) {
    super(`Cannot update run: run "${runId}" has finished and its record never changes`);
    this.name = "TerminalRunError";
  }
}

/** `putRun` was given an id that is already stored (run ids are never reused). */
export class DuplicateRunError extends Error {
  constructor(readonly runId: string) {
    super(`Cannot insert run: a run with id "${runId}" already exists`);
    this.name = "DuplicateRunError";
  }
}

/**
 * A run names an input series or input run that is not stored. Refusing it keeps the rule
 * "every run's inputs exist" true, which `deleteSeries`'s in-use check relies on.
 */
export class MissingInputError extends Error {
  constructor(
    readonly runId: string,
    readonly inputKind: "series" | "run" | "field",
    readonly inputId: string,
  ) {
    super(`Cannot record run "${runId}": its input ${inputKind} "${inputId}" is not stored`);
    this.name = "MissingInputError";
  }
}

/**
 * The store's schema is newer than this service knows (a newer service wrote it), or its
 * migration history disagrees with this service's. The service must not write to it.
 */
export class SchemaMismatchError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "SchemaMismatchError";
  }
}

/** `putOwner` was given an id that is already taken. */
export class DuplicateOwnerError extends Error {
  constructor(readonly ownerId: string) {
    super(`Cannot add owner: an owner with id "${ownerId}" already exists`);
    this.name = "DuplicateOwnerError";
  }
}
