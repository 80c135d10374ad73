/** Registers every demo seeder, in order: circuits and programs, runs, traces. */
import "./circuits";
import "./runs";
import "./traces";
