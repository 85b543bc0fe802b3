// VS Code language ids of the file kinds the calami server checks. The
// server also accepts these ids as the `languageId` of an opened document.
export const CHECKED_LANGUAGES: readonly string[] = [
  "markdown",
  "restructuredtext",
  "latex",
  "tex",
  "plaintext",
  "git-commit",
  "html",
  "python",
  "javascript",
  "javascriptreact",
  "typescript",
  "typescriptreact",
  "rust",
  "go",
  "c",
  "cpp",
  "java",
  "shellscript",
  "yaml",
  "toml",
];
