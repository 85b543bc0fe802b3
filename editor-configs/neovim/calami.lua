-- calami.lua: connects Neovim's built-in LSP client to `calami serve`.
--
-- Works with Neovim 0.7 (Debian bookworm ships 0.7.2) and newer: it uses
-- vim.lsp.start_client + vim.lsp.buf_attach_client, which every release
-- since 0.5 has, and no vim.fs or vim.lsp.start (both 0.8+).  On 0.11+ you
-- may prefer lsp/calami.lua with vim.lsp.enable('calami'); see README.md.
--
-- Usage (init.lua):
--   require('calami').setup({ settings = { calami = { variant = 'en-GB' } } })

local M = {}

-- Vim filetypes of the file kinds calami checks.
M.filetypes = {
  'markdown', 'rst', 'tex', 'plaintex', 'text', 'gitcommit', 'html',
  'python', 'javascript', 'javascriptreact', 'typescript', 'typescriptreact',
  'rust', 'go', 'c', 'cpp', 'java', 'sh', 'bash', 'yaml', 'toml',
}

-- Vim filetype -> LSP language id, where the two differ.
M.language_ids = {
  rst = 'restructuredtext',
  tex = 'latex',
  plaintex = 'tex',
  text = 'plaintext',
  gitcommit = 'git-commit',
  sh = 'shellscript',
  bash = 'shellscript',
}

-- The server's settings with their documented defaults.  They are sent as
-- initializationOptions (the inner table) and returned for the
-- workspace/configuration section "calami".
M.default_settings = {
  calami = {
    variant = 'any',              -- 'any' | 'en-US' | 'en-GB'
    hintThreshold = 0.5,          -- P(word is wrong) needed for a hint, in (0, 1]
    confidentThreshold = 0.95,    -- a fix above this is marked preferred
    severity = { nonword = 'information', realword = 'hint' },
    maxSuggestions = 5,
    checkStrings = false,         -- also check string literals in source files
    debounceMs = 150,
    modelPath = '',               -- '' = the model shipped with calami
    wordList = 'calami-lexicon.txt',
  },
}

-- The project root is the nearest folder holding one of these.
M.root_markers = { 'calami.toml', 'calami-lexicon.txt', 'calami-words.txt', 'pyproject.toml', '.git' }

local config = {
  cmd = { 'calami', 'serve' },
  filetypes = M.filetypes,
  root_markers = M.root_markers,
  settings = M.default_settings,
  on_attach = nil,
}

local clients_by_root = {}
local warned_missing = false

local function notify(message, level)
  vim.schedule(function()
    vim.notify(message, level or vim.log.levels.WARN)
  end)
end

-- Nearest parent directory of `path` that contains a root marker.
function M.find_root(path)
  local dir = vim.fn.fnamemodify(path, ':p:h')
  while true do
    for _, marker in ipairs(config.root_markers) do
      if vim.loop.fs_stat(dir .. '/' .. marker) then
        return dir
      end
    end
    local parent = vim.fn.fnamemodify(dir, ':h')
    if parent == dir then
      return nil
    end
    dir = parent
  end
end

-- The last "calami: ..." line the server wrote to stderr.  Neovim records a
-- server's stderr in the LSP log as an escaped Lua string, one chunk per entry.
function M.last_server_error()
  local ok, path = pcall(vim.lsp.get_log_path)
  if not ok or not path then
    return nil
  end
  local file = io.open(path, 'r')
  if not file then
    return nil
  end
  local size = file:seek('end')
  file:seek('set', math.max(0, size - 65536))
  local tail = file:read('*a') or ''
  file:close()
  local found
  for entry in tail:gmatch('[^\n]+') do
    local chunk = entry:match('"stderr"%s+"(.*)"%s*$')
    if chunk then
      chunk = chunk:gsub('\\r', ''):gsub('\\n', '\n'):gsub('\\"', '"'):gsub('\\\\', '\\')
      for line in chunk:gmatch('[^\n]+') do
        if line:match('^calami: ') then
          found = line
        end
      end
    end
  end
  return found
end

local function on_exit(code, signal, client_id)
  for root, id in pairs(clients_by_root) do
    if id == client_id then
      clients_by_root[root] = nil
    end
  end
  if code ~= 0 then
    -- Wait a moment: the stderr chunk may reach the log after the exit.
    vim.defer_fn(function()
      local reason = M.last_server_error()
      vim.notify(
        reason
          or string.format('calami: the server stopped (exit code %d, signal %d); see %s',
            code, signal or 0, vim.lsp.get_log_path()),
        vim.log.levels.ERROR
      )
    end, 200)
  end
end

local function client_config(root)
  local settings = config.settings or {}
  return {
    name = 'calami',
    cmd = config.cmd,
    root_dir = root,
    workspace_folders = {
      { uri = vim.uri_from_fname(root), name = vim.fn.fnamemodify(root, ':t') },
    },
    init_options = settings.calami or {},
    settings = settings,
    get_language_id = function(_, filetype)
      return M.language_ids[filetype] or filetype
    end,
    on_attach = config.on_attach,
    on_exit = on_exit,
  }
end

-- Attach calami to a buffer, starting one server per project root.
function M.attach(bufnr)
  bufnr = (bufnr == nil or bufnr == 0) and vim.api.nvim_get_current_buf() or bufnr
  if vim.fn.executable(config.cmd[1]) ~= 1 then
    if not warned_missing then
      warned_missing = true
      notify(string.format(
        "calami: the server program '%s' was not found on PATH; install calami "
          .. "(for example `pipx install calami`) or pass cmd = {'/full/path/to/calami', 'serve'} "
          .. "to require('calami').setup()",
        config.cmd[1]))
    end
    return nil
  end
  local name = vim.api.nvim_buf_get_name(bufnr)
  local root = (name ~= '' and M.find_root(name))
    or (name ~= '' and vim.fn.fnamemodify(name, ':p:h'))
    or vim.fn.getcwd()
  local client_id = clients_by_root[root]
  local client = client_id and vim.lsp.get_client_by_id(client_id)
  if not client or client.is_stopped() then
    client_id = vim.lsp.start_client(client_config(root))
    if not client_id then
      return nil
    end
    clients_by_root[root] = client_id
  end
  vim.lsp.buf_attach_client(bufnr, client_id)
  return client_id
end

-- The calami client attached to a buffer, if any.
function M.client(bufnr)
  bufnr = (bufnr == nil or bufnr == 0) and vim.api.nvim_get_current_buf() or bufnr
  for _, client in pairs(vim.lsp.buf_get_clients(bufnr)) do
    if client.name == 'calami' then
      return client
    end
  end
  return nil
end

-- Apply a code action: its edit first, then its command (which records the
-- accepted fix or writes the word list on the server side).
function M.apply_action(client, action, bufnr)
  if action.edit then
    vim.lsp.util.apply_workspace_edit(action.edit, client.offset_encoding or 'utf-16')
  end
  -- A code action carries its command in .command; a bare Command is one.
  local command = type(action.command) == 'table' and action.command
    or (type(action.command) == 'string' and action)
    or nil
  if command then
    client.request('workspace/executeCommand', {
      command = command.command,
      arguments = command.arguments,
    }, function() end, bufnr)
  end
end

-- Ask for the code actions on the word under the cursor and pass them to
-- `callback(client, actions)`.  Same request on 0.7 and newer.
function M.request_actions(bufnr, callback)
  bufnr = (bufnr == nil or bufnr == 0) and vim.api.nvim_get_current_buf() or bufnr
  local client = M.client(bufnr)
  if not client then
    notify('calami: no calami server is attached to this buffer')
    return
  end
  local params = vim.lsp.util.make_range_params(0, client.offset_encoding or 'utf-16')
  local line = params.range.start.line
  local col = vim.api.nvim_win_get_cursor(0)[2] -- byte column, like d.col
  local encoding = client.offset_encoding or 'utf-16'
  local diagnostics = {}
  for _, d in ipairs(vim.diagnostic.get(bufnr, { lnum = line })) do
    local lsp = vim.deepcopy(d.user_data and d.user_data.lsp or {})
    local under_cursor = d.lnum == line and d.col <= col and col <= d.end_col
    if under_cursor and (d.source == 'calami' or lsp.source == 'calami') then
      -- 0.7 keeps only some LSP fields in user_data (no range); rebuild the
      -- rest, converting byte columns back to the negotiated encoding.
      lsp.range = lsp.range or {
        start = { line = d.lnum, character = vim.lsp.util.character_offset(bufnr, d.lnum, d.col, encoding) },
        ['end'] = { line = d.end_lnum, character = vim.lsp.util.character_offset(bufnr, d.end_lnum, d.end_col, encoding) },
      }
      lsp.message = lsp.message or d.message
      lsp.severity = lsp.severity or d.severity
      lsp.code = lsp.code or d.code
      lsp.source = lsp.source or d.source
      table.insert(diagnostics, lsp)
    end
  end
  if #diagnostics == 0 then
    notify('calami: no calami hint under the cursor', vim.log.levels.INFO)
    return
  end
  params.context = { diagnostics = diagnostics, only = { 'quickfix' } }
  client.request('textDocument/codeAction', params, function(err, result)
    if err then
      notify('calami: code actions failed: ' .. (err.message or vim.inspect(err)))
      return
    end
    callback(client, result or {})
  end, bufnr)
end

-- :CalamiFix: apply the preferred replacement for the word under the cursor
-- (0.8+ users can also call vim.lsp.buf.code_action with a filter).
function M.fix(bufnr)
  bufnr = (bufnr == nil or bufnr == 0) and vim.api.nvim_get_current_buf() or bufnr
  M.request_actions(bufnr, function(client, actions)
    for _, action in ipairs(actions) do
      if action.isPreferred then
        M.apply_action(client, action, bufnr)
        return
      end
    end
    notify('calami: no preferred fix here; use vim.lsp.buf.code_action() to choose one',
      vim.log.levels.INFO)
  end)
end

-- Options: cmd, settings (merged over the defaults), filetypes,
-- root_markers, on_attach, autostart (default true).
function M.setup(opts)
  opts = opts or {}
  config.cmd = opts.cmd or config.cmd
  config.filetypes = opts.filetypes or config.filetypes
  config.root_markers = opts.root_markers or config.root_markers
  config.on_attach = opts.on_attach or config.on_attach
  config.settings = vim.tbl_deep_extend('force', M.default_settings, opts.settings or {})

  vim.api.nvim_create_user_command('CalamiFix', function()
    M.fix(0)
  end, { desc = 'Apply the preferred calami fix for the word under the cursor' })

  if opts.autostart ~= false then
    local group = vim.api.nvim_create_augroup('calami_lsp', { clear = true })
    vim.api.nvim_create_autocmd('FileType', {
      group = group,
      pattern = config.filetypes,
      callback = function(args)
        if vim.bo[args.buf].buftype == '' then
          M.attach(args.buf)
        end
      end,
      desc = 'Start or reuse the calami language server',
    })
  end
  return M
end

return M
