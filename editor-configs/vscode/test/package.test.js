// Guards the extension manifest against drift from the settings contract of
// the calami server (names, types, defaults as agreed for the server's
// initializationOptions and workspace/configuration section "calami").
// Run with `npm test` (compiles first; uses node's built-in test runner).
"use strict";
const test = require("node:test");
const assert = require("node:assert/strict");
const fs = require("node:fs");
const path = require("node:path");

const root = path.join(__dirname, "..");
const manifest = JSON.parse(fs.readFileSync(path.join(root, "package.json"), "utf8"));
const properties = manifest.contributes.configuration.properties;
const { CHECKED_LANGUAGES } = require("../out/languages.js");
const { SERVER_SETTING_KEYS, serverSettings } = require("../out/serverSettings.js");

const SEVERITIES = ["error", "warning", "information", "hint"];

// The contract. Change it only together with the server.
const SERVER_SETTINGS = {
  "calami.variant": { type: "string", default: "any", enum: ["any", "en-US", "en-GB"] },
  "calami.hintThreshold": { type: "number", default: 0.5 },
  "calami.confidentThreshold": { type: "number", default: 0.95 },
  "calami.severity.nonword": { type: "string", default: "information", enum: SEVERITIES },
  "calami.severity.realword": { type: "string", default: "hint", enum: SEVERITIES },
  "calami.maxSuggestions": { type: "integer", default: 5 },
  "calami.checkStrings": { type: "boolean", default: false },
  "calami.debounceMs": { type: "integer", default: 150 },
  "calami.modelPath": { type: "string", default: "" },
  "calami.wordList": { type: "string", default: "calami-lexicon.txt" },
};
const CLIENT_SETTINGS = {
  "calami.serverPath": { type: "string", default: "calami" },
  "calami.serverArgs": { type: "array", default: ["serve"] },
  "calami.trace.server": { type: "string", default: "off", enum: ["off", "messages", "verbose"] },
};
const EXPECTED = { ...SERVER_SETTINGS, ...CLIENT_SETTINGS };

// Commands the server registers through workspace/executeCommand; the
// language client registers them in VS Code, so the extension must not.
const SERVER_COMMANDS = [
  "calami.recordReplacement",
  "calami.addProjectWord",
  "calami.addUserWord",
  "calami.ignoreWord",
  "calami.reloadConfiguration",
];

for (const [key, want] of Object.entries(EXPECTED)) {
  test(`setting ${key} has the agreed type, default and values`, () => {
    const got = properties[key];
    assert.ok(got, `${key} is missing from contributes.configuration`);
    assert.equal(got.type, want.type);
    assert.deepEqual(got.default, want.default);
    if (want.enum) {
      assert.deepEqual(got.enum, want.enum);
    }
    assert.ok(
      (got.description || got.markdownDescription || "").length > 20,
      `${key} needs a description for the settings UI`,
    );
  });
}

test("no setting outside the contract is contributed", () => {
  assert.deepEqual(Object.keys(properties).sort(), Object.keys(EXPECTED).sort());
});

test("numeric defaults satisfy their own bounds", () => {
  for (const [key, spec] of Object.entries(properties)) {
    if (spec.type !== "number" && spec.type !== "integer") continue;
    const value = spec.default;
    if (spec.type === "integer") assert.ok(Number.isInteger(value), key);
    if (spec.minimum !== undefined) assert.ok(value >= spec.minimum, key);
    if (spec.exclusiveMinimum !== undefined) assert.ok(value > spec.exclusiveMinimum, key);
    if (spec.maximum !== undefined) assert.ok(value <= spec.maximum, key);
  }
  // hintThreshold is a probability in (0, 1].
  assert.equal(properties["calami.hintThreshold"].exclusiveMinimum, 0);
  assert.equal(properties["calami.hintThreshold"].maximum, 1);
});

test("the code sends exactly the server settings as initializationOptions", () => {
  const fromCode = SERVER_SETTING_KEYS.map((key) => `calami.${key}`).sort();
  assert.deepEqual(fromCode, Object.keys(SERVER_SETTINGS).sort());
});

test("initializationOptions use the nested shape of workspace/configuration", () => {
  const defaults = {};
  for (const [key, spec] of Object.entries(SERVER_SETTINGS)) defaults[key.slice("calami.".length)] = spec.default;
  const options = serverSettings((key) => defaults[key]);
  assert.deepEqual(options.severity, { nonword: "information", realword: "hint" });
  assert.equal(options.variant, "any");
  assert.equal(options.wordList, "calami-lexicon.txt");
  assert.equal("serverPath" in options, false);
  assert.equal("severity.nonword" in options, false);
});

test("every checked language activates the extension", () => {
  const events = new Set(manifest.activationEvents);
  for (const language of CHECKED_LANGUAGES) {
    assert.ok(events.has(`onLanguage:${language}`), language);
  }
  assert.equal(manifest.activationEvents.length, CHECKED_LANGUAGES.length);
});

test("client commands do not collide with the server's commands", () => {
  const ours = manifest.contributes.commands.map((c) => c.command);
  for (const command of SERVER_COMMANDS) assert.ok(!ours.includes(command), command);
});

test("the manifest is our own and packageable", () => {
  assert.equal(manifest.name, "calami-vscode");
  assert.equal(manifest.main, "./out/extension.js");
  assert.ok(manifest.dependencies["vscode-languageclient"]);
  // vsce refuses @types/vscode newer than engines.vscode.
  const engine = manifest.engines.vscode.replace(/^\^/, "");
  assert.equal(manifest.devDependencies["@types/vscode"], engine);
  assert.ok(fs.existsSync(path.join(root, "LICENSE")), "vsce asks interactively when LICENSE is missing");
});
