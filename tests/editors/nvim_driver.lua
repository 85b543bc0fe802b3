-- Drives headless Neovim for tests/editors/test_neovim.py: opens the demo
-- files, waits for calami's diagnostics, applies the preferred fix with the
-- shipped config's :CalamiFix and writes everything it saw to a JSON file.
-- Then it picks "add to the project lexicon" for a second word from the
-- menu of vim.lsp.buf.code_action() (vim.ui.select, answered as a user would).
-- Environment: CALAMI_TEST_OUT (JSON path), CALAMI_TEST_FILES (paths
-- separated by '|'; the first is the one fixed), CALAMI_TEST_FIX and
-- CALAMI_TEST_ADD ("line:col", 0-based line and byte column of the word to
-- fix / to add), CALAMI_TEST_ADD_TITLE (the menu entry to pick),
-- CALAMI_TEST_WORD_LIST (the file it edits), CALAMI_TEST_SCENARIO ("full",
-- or "start-only": open the first file and report what the user is told),
-- CALAMI_TEST_TIMEOUT_MS (one budget for all the waiting together).
local out_path = vim.env.CALAMI_TEST_OUT
local files = vim.split(vim.env.CALAMI_TEST_FILES, '|', { plain = true })
local deadline = vim.loop.now() + tonumber(vim.env.CALAMI_TEST_TIMEOUT_MS or '60000')
local result = { files = {}, errors = {}, messages = {} }

-- Remember every client the config starts, to notice when its server died.
local calami = require('calami')
local client_ids = {}
local attach = calami.attach
calami.attach = function(bufnr)
  local id = attach(bufnr)
  if id then client_ids[id] = true end
  return id
end

local function server_gone()
  for id in pairs(client_ids) do
    if not vim.lsp.get_client_by_id(id) then return true end
  end
  return false
end

-- Wait for `condition` until the shared deadline, or until the server died.
local function wait_for(condition)
  return vim.wait(math.max(0, deadline - vim.loop.now()), function()
    return server_gone() or condition()
  end, 50) and not server_gone()
end

-- Messages from the config (vim.notify) are part of what the user sees.
local notify = vim.notify
vim.notify = function(msg, level, opts)
  table.insert(result.messages, { msg = msg, level = level })
  return notify(msg, level, opts)
end

local function finish()
  local file = assert(io.open(out_path, 'w'))
  file:write(vim.fn.json_encode(result))
  file:close()
  vim.cmd('qall!')
end

local function calami_diagnostics(bufnr)
  local out = {}
  for _, d in ipairs(vim.diagnostic.get(bufnr)) do
    if d.source == 'calami' then
      table.insert(out, {
        lnum = d.lnum, col = d.col, end_lnum = d.end_lnum, end_col = d.end_col,
        message = d.message, code = d.code, severity = d.severity,
      })
    end
  end
  table.sort(out, function(a, b) return a.lnum < b.lnum or (a.lnum == b.lnum and a.col < b.col) end)
  return out
end

local function read_file(path)
  local file = io.open(path, 'r')
  if not file then return nil end
  local text = file:read('*a')
  file:close()
  return text
end

-- Open the first file and wait until the user has been told something.
local function run_start_only()
  vim.cmd('edit ' .. vim.fn.fnameescape(files[1]))
  vim.wait(math.max(0, deadline - vim.loop.now()), function()
    for _, m in ipairs(result.messages) do
      if type(m.msg) == 'string' and m.msg:match('^calami: ') then return true end
    end
    return false
  end, 50)
  result.attached = calami.client(0) ~= nil
end

local function run()
  if vim.env.CALAMI_TEST_SCENARIO == 'start-only' then
    return run_start_only()
  end
  local buffers = {}
  for _, path in ipairs(files) do
    vim.cmd('edit ' .. vim.fn.fnameescape(path))
    buffers[path] = vim.api.nvim_get_current_buf()
  end
  for _, path in ipairs(files) do
    local bufnr = buffers[path]
    local ok = wait_for(function() return #calami_diagnostics(bufnr) > 0 end)
    local client = calami.client(bufnr)
    result.files[path] = {
      filetype = vim.bo[bufnr].filetype,
      attached = client ~= nil,
      offset_encoding = client and client.offset_encoding or vim.NIL,
      timed_out = not ok,
      diagnostics = calami_diagnostics(bufnr),
    }
  end

  -- The fix: cursor on the word in the first file, then :CalamiFix.
  local first = files[1]
  local bufnr = buffers[first]
  vim.cmd('buffer ' .. bufnr)
  local before = vim.api.nvim_buf_get_lines(bufnr, 0, -1, false)
  local line, col = vim.env.CALAMI_TEST_FIX:match('^(%d+):(%d+)$')
  vim.api.nvim_win_set_cursor(0, { tonumber(line) + 1, tonumber(col) })
  local tick = vim.api.nvim_buf_get_changedtick(bufnr)
  vim.cmd('CalamiFix')
  local changed = wait_for(function()
    return vim.api.nvim_buf_get_changedtick(bufnr) ~= tick
  end)
  local fixed_line = tonumber(line)
  -- After the edit the server re-checks; wait until the fixed word's hint is gone.
  local rechecked = wait_for(function()
    for _, d in ipairs(calami_diagnostics(bufnr)) do
      if d.lnum == fixed_line and d.col == tonumber(col) then
        return false
      end
    end
    return #calami_diagnostics(bufnr) > 0
  end)
  -- The accepted fix is reported to the server by workspace/executeCommand;
  -- give it time to reach the profile before quitting.
  local profile = vim.env.CALAMI_PROFILE_DIR .. '/profile.msgpack'
  local recorded = wait_for(function() return vim.loop.fs_stat(profile) ~= nil end)
  result.fix = {
    changed = changed,
    rechecked = rechecked,
    recorded = recorded,
    lines_before = before,
    lines_after = vim.api.nvim_buf_get_lines(bufnr, 0, -1, false),
    modified = vim.bo[bufnr].modified,
    diagnostics_after = calami_diagnostics(bufnr),
  }

  -- "Add to the project lexicon": the code-action menu, the entry by title.
  local title = vim.env.CALAMI_TEST_ADD_TITLE
  local word_list = vim.env.CALAMI_TEST_WORD_LIST
  local listed_before = read_file(word_list)
  local add_line, add_col = vim.env.CALAMI_TEST_ADD:match('^(%d+):(%d+)$')
  add_line, add_col = tonumber(add_line), tonumber(add_col)
  vim.api.nvim_win_set_cursor(0, { add_line + 1, add_col })
  local menu = nil
  vim.ui.select = function(items, opts, on_choice)
    menu = {}
    local picked = nil
    for index, item in ipairs(items) do
      local text = opts.format_item and opts.format_item(item) or tostring(item)
      table.insert(menu, text)
      local action = item[2] or item.action or item  -- 0.7: {client_id, action}
      if action.title == title and not picked then picked = index end
    end
    if picked then on_choice(items[picked], picked) else on_choice(nil, nil) end
  end
  vim.lsp.buf.code_action()
  local shown = wait_for(function() return menu ~= nil end)
  local written = wait_for(function()
    local now = read_file(word_list)
    return now ~= nil and now ~= listed_before
  end)
  local add_rechecked = wait_for(function()
    for _, d in ipairs(calami_diagnostics(bufnr)) do
      if d.lnum == add_line and d.col == add_col then return false end
    end
    return #calami_diagnostics(bufnr) > 0
  end)
  result.add = {
    menu = menu or vim.NIL,
    shown = shown,
    written = written,
    rechecked = add_rechecked,
    lines_after = vim.api.nvim_buf_get_lines(bufnr, 0, -1, false),
    diagnostics_after = calami_diagnostics(bufnr),
  }
end

local ok, err = xpcall(run, debug.traceback)
if not ok then
  table.insert(result.errors, err)
end
result.server_gone = server_gone()
if result.server_gone then
  -- The config shows the server's own "calami: ..." line after a moment.
  vim.wait(1000, function() return false end)
end
finish()
