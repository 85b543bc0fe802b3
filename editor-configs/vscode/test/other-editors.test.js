// The JSON configurations of the other editors carry the same settings and
// defaults as this extension's manifest; a drift in one of them fails here.
"use strict";
const test = require("node:test");
const assert = require("node:assert/strict");
const fs = require("node:fs");
const path = require("node:path");

const editors = path.join(__dirname, "..", "..");
const properties = JSON.parse(fs.readFileSync(path.join(__dirname, "..", "package.json"), "utf8")).contributes
  .configuration.properties;

// The server settings in the nested shape of workspace/configuration "calami".
function expectedDefaults() {
  const nested = {};
  for (const [key, spec] of Object.entries(properties)) {
    if (["calami.serverPath", "calami.serverArgs", "calami.trace.server"].includes(key)) continue;
    const parts = key.split(".").slice(1);
    let target = nested;
    for (const part of parts.slice(0, -1)) target = target[part] ??= {};
    target[parts[parts.length - 1]] = spec.default;
  }
  return nested;
}

function readJson(...parts) {
  return JSON.parse(fs.readFileSync(path.join(editors, ...parts), "utf8"));
}

test("Kate: both settings copies equal the defaults", () => {
  const server = readJson("kate", "settings.json").servers.calami;
  assert.deepEqual(server.command, ["calami", "serve"]);
  assert.deepEqual(server.initializationOptions, expectedDefaults());
  assert.deepEqual(server.settings.calami, expectedDefaults());
});

test("Sublime Text: initializationOptions and dotted settings equal the defaults", () => {
  const client = readJson("sublime-text", "LSP.sublime-settings").clients.calami;
  assert.deepEqual(client.command, ["calami", "serve"]);
  assert.deepEqual(client.initializationOptions, expectedDefaults());
  const expanded = {};
  for (const [key, value] of Object.entries(client.settings)) {
    const parts = key.split(".");
    let target = expanded;
    for (const part of parts.slice(0, -1)) target = target[part] ??= {};
    target[parts[parts.length - 1]] = value;
  }
  assert.deepEqual(expanded, { calami: expectedDefaults() });
});

test("Zed: both settings copies equal the defaults", () => {
  const lsp = readJson("zed", "settings.json").lsp.calami;
  assert.deepEqual(lsp.initialization_options, expectedDefaults());
  assert.deepEqual(lsp.settings.calami, expectedDefaults());
});
