import { readFileSync } from "node:fs";
import { resolve } from "node:path";

export const APP_VERSION: string = JSON.parse(readFileSync(resolve(__dirname, "..", "package.json"), "utf8")).version;
