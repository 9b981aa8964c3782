/**
 * The NetCDF data model as plain data: dimensions, typed attributes and variables (Unidata,
 * "The NetCDF Data Model", NetCDF User's Guide §2; the classic model plus the NetCDF-4 numeric
 * and string types a reader may meet). Readers describe files with these shapes and the
 * writer takes them.
 *
 * @module
 */

/** NetCDF external types: the six classic ones, then the NetCDF-4 additions. */
export type NetcdfType =
  | "byte"
  | "char"
  | "short"
  | "int"
  | "float"
  | "double"
  | "ubyte"
  | "ushort"
  | "uint"
  | "int64"
  | "uint64"
  | "string";

/** The types a NetCDF-3 classic file can hold. */
export type NetcdfClassicType = "byte" | "char" | "short" | "int" | "float" | "double";

/** Bytes per value of each classic type (NetCDF classic format specification). */
export const NETCDF_CLASSIC_TYPE_SIZE: Readonly<Record<NetcdfClassicType, number>> = {
  byte: 1,
  char: 1,
  short: 2,
  int: 4,
  float: 4,
  double: 8,
};

/** A named attribute with its external type: text for `char`/`string`, else numbers. */
export interface NetcdfAttribute {
  name: string;
  type: NetcdfType;
  value: string | number[];
}

/** A dimension. `unlimited` marks the record dimension of a NetCDF-3 file. */
export interface NetcdfDimension {
  name: string;
  size: number;
  unlimited?: boolean;
}

/** A variable as a reader describes it (no data). */
export interface NetcdfVariableInfo {
  name: string;
  type: NetcdfType;
  /** Dimension names, slowest varying first. */
  dimensions: string[];
  /** Sizes along `dimensions`. */
  shape: number[];
  attributes: NetcdfAttribute[];
}

/**
 * A text attribute.
 *
 * @param name attribute name
 * @param value its text
 * @returns the attribute (`char`)
 * @example
 * ```ts
 * import { ncText } from "./netcdf_model.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(ncText("units", "W m-2"), { name: "units", type: "char", value: "W m-2" });
 * ```
 */
export function ncText(name: string, value: string): NetcdfAttribute {
  return { name, type: "char", value };
}

/**
 * A numeric attribute of one of the classic numeric types.
 *
 * @param name attribute name
 * @param type `byte`, `short`, `int`, `float` or `double`
 * @param values one or more numbers
 * @returns the attribute
 * @example
 * ```ts
 * import { ncNumber } from "./netcdf_model.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(ncNumber("_FillValue", "double", NaN).value, [NaN]);
 * ```
 */
export function ncNumber(
  name: string,
  type: Exclude<NetcdfClassicType, "char">,
  ...values: number[]
): NetcdfAttribute {
  return { name, type, value: values };
}

/**
 * The value of a named attribute: its text, its single number, or its numbers.
 *
 * @param attributes the attribute list
 * @param name the attribute name (exact)
 * @returns the text, the number when there is exactly one, the array otherwise, or undefined
 * @example
 * ```ts
 * import { attributeValue, ncNumber, ncText } from "./netcdf_model.ts";
 * import assert from "node:assert/strict";
 * const attrs = [ncText("units", "K"), ncNumber("valid_range", "float", 0, 400)];
 * assert.equal(attributeValue(attrs, "units"), "K");
 * assert.deepEqual(attributeValue(attrs, "valid_range"), [0, 400]);
 * assert.equal(attributeValue(attrs, "calendar"), undefined);
 * ```
 */
export function attributeValue(
  attributes: readonly NetcdfAttribute[],
  name: string,
): string | number | number[] | undefined {
  const a = attributes.find((x) => x.name === name);
  if (!a) return undefined;
  if (typeof a.value === "string") return a.value;
  return a.value.length === 1 ? a.value[0] : a.value;
}

/**
 * A named attribute as text, when it is text.
 *
 * @param attributes the attribute list
 * @param name the attribute name
 * @returns the text, or undefined when absent or numeric
 * @example
 * ```ts
 * import { attributeText, ncNumber } from "./netcdf_model.ts";
 * import assert from "node:assert/strict";
 * assert.equal(attributeText([ncNumber("units", "int", 1)], "units"), undefined);
 * ```
 */
export function attributeText(
  attributes: readonly NetcdfAttribute[],
  name: string,
): string | undefined {
  const v = attributeValue(attributes, name);
  return typeof v === "string" ? v : undefined;
}
