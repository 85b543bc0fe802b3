// Finding the server program before we spawn it, so that a missing program
// gets our own one-line explanation instead of a bare "spawn ENOENT".
// Kept free of the `vscode` module so `node --test` can load it.
import * as fs from "fs";
import * as path from "path";

/** Where `program` would be run from, or undefined when it cannot be found. */
export function resolveExecutable(
  program: string,
  envPath: string | undefined = process.env.PATH,
  platform: NodeJS.Platform = process.platform,
  pathExt: string | undefined = process.env.PATHEXT,
): string | undefined {
  if (!program) {
    return undefined;
  }
  const extensions =
    platform === "win32" ? ["", ...(pathExt ?? ".EXE;.CMD;.BAT;.COM").split(";").filter(Boolean)] : [""];
  const candidates: string[] = [];
  if (program.includes("/") || (platform === "win32" && program.includes("\\"))) {
    candidates.push(program); // an explicit path is not searched on PATH
  } else {
    const separator = platform === "win32" ? ";" : ":";
    for (const dir of (envPath ?? "").split(separator)) {
      if (dir) {
        candidates.push(path.join(dir, program));
      }
    }
  }
  for (const base of candidates) {
    for (const ext of extensions) {
      const file = base + ext;
      if (isExecutableFile(file, platform)) {
        return file;
      }
    }
  }
  return undefined;
}

function isExecutableFile(file: string, platform: NodeJS.Platform): boolean {
  try {
    if (!fs.statSync(file).isFile()) {
      return false;
    }
    if (platform !== "win32") {
      fs.accessSync(file, fs.constants.X_OK);
    }
    return true;
  } catch {
    return false;
  }
}

/** The message shown when the program is missing; it names the fix. */
export function missingProgramMessage(program: string): string {
  return (
    `calami: the server program '${program}' was not found` +
    (program.includes("/") || program.includes("\\") ? "" : " on PATH") +
    "; install calami (for example `pipx install calami`) or set calami.serverPath to its full path."
  );
}
