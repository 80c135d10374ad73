/** SBML in Linger: import (Level 3 Core subset). Pure: strings in, circuits and reports out. */
export { importSbml, formatSbmlProblems, type SbmlImport, type SbmlProblem } from "./import-sbml";
export { exportSbml, LINGER_SBML_NS } from "./export-sbml";
