-- A minimal Neovim init that loads only the calami configuration, for trying
-- it out and for automated tests:
--   nvim --headless -u editor-configs/neovim/init-minimal.lua notes.md
-- Environment (optional):
--   CALAMI_NVIM_CMD   the server command, words separated by spaces
--                     (default: "calami serve")
--   CALAMI_NVIM_LOG   LSP log level: "trace", "debug", "info", "warn", "error"
local here = vim.fn.fnamemodify(debug.getinfo(1, 'S').source:sub(2), ':p:h')
package.path = here .. '/?.lua;' .. package.path

vim.opt.swapfile = false
vim.opt.shadafile = 'NONE'
vim.cmd('filetype on')

if vim.env.CALAMI_NVIM_LOG and vim.env.CALAMI_NVIM_LOG ~= '' then
  vim.lsp.set_log_level(vim.env.CALAMI_NVIM_LOG)
end

local cmd
if vim.env.CALAMI_NVIM_CMD and vim.env.CALAMI_NVIM_CMD ~= '' then
  cmd = vim.split(vim.env.CALAMI_NVIM_CMD, ' ', { trimempty = true })
end

require('calami').setup({ cmd = cmd })
