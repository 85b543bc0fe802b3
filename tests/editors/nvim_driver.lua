-- Drives headless Neovim for tests/editors/test_neovim.py: opens the demo
-- files, waits for calami's diagnostics, applies the preferred fix with the
-- shipped config's :CalamiFix and writes everything it saw to a JSON file.
-- Environment: CALAMI_TEST_OUT (JSON path), CALAMI_TEST_FILES (paths
-- separated by '|'; the first is the one fixed), CALAMI_TEST_FIX ("line:col",
-- 0-based line and byte column of the word to fix), CALAMI_TEST_TIMEOUT_MS
-- (one budget for all the waiting together).
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

local function run()
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
