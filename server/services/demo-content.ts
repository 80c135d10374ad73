/** Registers every demo seeder, in order: circuits and programs, runs, traces. */
import "./demo-circuits";
import "./demo-runs";
import "./demo-traces";
