// Unit tests for the parts of the extension that do not need VS Code.
"use strict";
const test = require("node:test");
const assert = require("node:assert/strict");
const fs = require("node:fs");
const os = require("node:os");
const path = require("node:path");
const { FatalLineCollector } = require("../out/fatalLine.js");
const { resolveExecutable, missingProgramMessage } = require("../out/serverCommand.js");

test("the fatal line is found even when stderr arrives in pieces", () => {
  const lines = new FatalLineCollector();
  lines.push("INFO loading\ncala");
  lines.push("mi: model file not found at /x/m.msgpack; reinstall calami or set calami.mod");
  lines.push("elPath\r\n");
  assert.equal(
    lines.lastFatalLine(),
    "calami: model file not found at /x/m.msgpack; reinstall calami or set calami.modelPath",
  );
});

test("an unterminated last line counts; other lines do not", () => {
  const lines = new FatalLineCollector();
  lines.push("Traceback ...\n  calamity: no\n");
  assert.equal(lines.lastFatalLine(), undefined);
  lines.push("calami: bad value for calami.variant");
  assert.equal(lines.lastFatalLine(), "calami: bad value for calami.variant");
});

test("programs are found on PATH only when executable", (t) => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "calami-vscode-"));
  t.after(() => fs.rmSync(dir, { recursive: true, force: true }));
  const program = path.join(dir, "calami");
  fs.writeFileSync(program, "#!/bin/sh\n");
  fs.chmodSync(program, 0o644);
  assert.equal(resolveExecutable("calami", dir, "linux"), undefined);
  fs.chmodSync(program, 0o755);
  assert.equal(resolveExecutable("calami", `/nonexistent:${dir}`, "linux"), program);
  assert.equal(resolveExecutable(program, "", "linux"), program);
  assert.equal(resolveExecutable("calami", "", "linux"), undefined);
  assert.equal(resolveExecutable("", dir, "linux"), undefined);
  fs.mkdirSync(path.join(dir, "sub", "calami"), { recursive: true });
  assert.equal(resolveExecutable("calami", path.join(dir, "sub"), "linux"), undefined, "a directory is no program");
});

test("the missing-program message names the fix", () => {
  const message = missingProgramMessage("calami");
  assert.match(message, /^calami: /);
  assert.match(message, /PATH/);
  assert.match(message, /calami\.serverPath/);
  assert.doesNotMatch(missingProgramMessage("/opt/calami/bin/calami"), /on PATH/);
});
