/**
 * Worker task of the "cycle-forecasts" analysis: one hindcast case (a past cycle forecast from
 * its first months), run in parallel (name kept so stored runs replay).
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { hindcastCaseTask } from "../../../core/cycles/mod.ts";

export const cycleForecastsTasks: Record<string, Task> = {
  "cycles.hindcast_case": hindcastCaseTask,
};
