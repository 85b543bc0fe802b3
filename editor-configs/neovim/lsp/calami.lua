-- Neovim 0.11+ configuration for the calami language server.
-- Put this file in a `lsp/` folder on your 'runtimepath' (for example
-- ~/.config/nvim/lsp/calami.lua) and add to init.lua:
--   vim.lsp.enable('calami')
-- Override settings with vim.lsp.config('calami', { settings = { calami = { variant = 'en-GB' } } }).
-- For Neovim 0.7-0.10 use ../calami.lua instead (see README.md).
local language_ids = {
  rst = 'restructuredtext', tex = 'latex', plaintex = 'tex', text = 'plaintext',
  gitcommit = 'git-commit', sh = 'shellscript', bash = 'shellscript',
}

local settings = {
  calami = {
    variant = 'any',
    hintThreshold = 0.5,
    confidentThreshold = 0.95,
    severity = { nonword = 'information', realword = 'hint' },
    maxSuggestions = 5,
    checkStrings = false,
    debounceMs = 150,
    modelPath = '',
    wordList = 'calami-lexicon.txt',
  },
}

return {
  cmd = { 'calami', 'serve' },
  filetypes = {
    'markdown', 'rst', 'tex', 'plaintex', 'text', 'gitcommit', 'html',
    'python', 'javascript', 'javascriptreact', 'typescript', 'typescriptreact',
    'rust', 'go', 'c', 'cpp', 'java', 'sh', 'bash', 'yaml', 'toml',
  },
  root_markers = { 'calami.toml', 'calami-lexicon.txt', 'calami-words.txt', 'pyproject.toml', '.git' },
  settings = settings,
  -- before_init sees the merged config, so vim.lsp.config overrides reach
  -- initializationOptions too.
  before_init = function(params, config)
    params.initializationOptions = (config.settings or settings).calami
  end,
  get_language_id = function(_, filetype)
    return language_ids[filetype] or filetype
  end,
}
