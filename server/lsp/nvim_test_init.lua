-- Headless Neovim (0.7+) set-up used by deckward's editor test: attaches the
-- deckward language server to *.deck buffers, then Dump() waits for the
-- diagnostics to settle and prints them as one JSON line on stdout.
-- DECKWARD_LSP_CMD: the server command as a JSON array.
local cmd = vim.fn.json_decode(vim.env.DECKWARD_LSP_CMD)
local timeout = tonumber(vim.env.DECKWARD_LSP_TIMEOUT_MS or "20000")
vim.cmd([[autocmd BufRead,BufNewFile *.deck setfiletype deck]])
vim.api.nvim_create_autocmd("FileType", { pattern = "deck", callback = function(args)
  local id = vim.lsp.start_client({ name = "deckward", cmd = cmd, root_dir = vim.fn.getcwd() })
  vim.lsp.buf_attach_client(args.buf, id)
end })
function _G.Dump()
  local ok, err = pcall(function()
    local buf, last = vim.api.nvim_get_current_buf(), vim.loop.now()
    vim.api.nvim_create_autocmd("DiagnosticChanged", { buffer = buf,
      callback = function() last = vim.loop.now() end })
    local got = vim.wait(timeout, function()
      return #vim.diagnostic.get(buf) > 0 and vim.loop.now() - last > 300 end, 50)
    local out = {}
    for _, d in ipairs(vim.diagnostic.get(buf)) do
      out[#out + 1] = { lnum = d.lnum, col = d.col, end_lnum = d.end_lnum, end_col = d.end_col,
        severity = d.severity, message = d.message, source = d.source,
        code = (d.user_data and d.user_data.lsp or {}).code }
    end
    io.stdout:write(vim.fn.json_encode({ ok = got, diagnostics = out }) .. "\n")
    for _, c in pairs(vim.lsp.get_active_clients()) do c.stop() end
    vim.wait(2000, function() return #vim.lsp.get_active_clients() == 0 end, 50)
  end)
  if not ok then io.stderr:write(tostring(err) .. "\n"); vim.cmd("cquit 2") end
  vim.cmd("qa!")
end
