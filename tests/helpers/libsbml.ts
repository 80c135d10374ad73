/**
 * libSBML consistency check of SBML documents through Debian's python3-sbml5
 * (`/usr/bin/python3` explicitly: a python3 earlier on PATH may not see it).
 * For each document: the messages of errors of severity >= LIBSBML_SEV_ERROR
 * (unit warnings and other warnings are not counted).
 */
import { execFileSync } from "node:child_process";

const VALIDATE = `
import sys, json, libsbml
out = []
for text in json.load(sys.stdin):
    d = libsbml.readSBMLFromString(text)
    d.checkConsistency()
    errs = [d.getError(i) for i in range(d.getNumErrors())]
    out.append([e.getMessage().strip()[:300] for e in errs if e.getSeverity() >= libsbml.LIBSBML_SEV_ERROR])
print(json.dumps(out))
`;

export function libsbmlErrors(docs: string[]): string[][] {
  const stdout = execFileSync("/usr/bin/python3", ["-c", VALIDATE], { input: JSON.stringify(docs) });
  return JSON.parse(String(stdout));
}
