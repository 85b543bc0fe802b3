// The settings the server understands, in the nested shape that
// workspace/configuration for section "calami" also returns (VS Code turns
// "calami.severity.nonword" into { severity: { nonword } }). The client-only
// settings (serverPath, serverArgs, trace) are left out of initializationOptions.

/** Reads one setting below "calami."; matches vscode.WorkspaceConfiguration.get. */
export type SettingReader = <T>(key: string) => T | undefined;

export const SERVER_SETTING_KEYS = [
  "variant",
  "hintThreshold",
  "confidentThreshold",
  "severity.nonword",
  "severity.realword",
  "maxSuggestions",
  "checkStrings",
  "debounceMs",
  "modelPath",
  "wordList",
] as const;

export function serverSettings(read: SettingReader): Record<string, unknown> {
  const result: Record<string, unknown> = {};
  for (const key of SERVER_SETTING_KEYS) {
    const value = read<unknown>(key);
    if (value === undefined) {
      continue;
    }
    const parts = key.split(".");
    let target = result;
    for (const part of parts.slice(0, -1)) {
      target = (target[part] ??= {}) as Record<string, unknown>;
    }
    target[parts[parts.length - 1]] = value;
  }
  return result;
}
