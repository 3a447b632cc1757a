-- Headless Neovim driver for tests/test_nvim.py: loads one of the editor
-- configs of editors/neovim (DECKWARD_NVIM_CONFIG) with the server command
-- DECKWARD_LSP_CMD, then Run() opens a deck, edits the file it uses without
-- saving, and prints one JSON line: file types, clients, and the deck's
-- diagnostics before and after the edit.
vim.g.deckward_cmd = vim.fn.json_decode(vim.env.DECKWARD_LSP_CMD)
dofile(vim.env.DECKWARD_NVIM_CONFIG)
local timeout = tonumber(vim.env.DECKWARD_LSP_TIMEOUT_MS or "20000")

local function rows(buf)
  local out = {}
  for _, d in ipairs(vim.diagnostic.get(buf)) do
    out[#out + 1] = { lnum = d.lnum, col = d.col, end_col = d.end_col, message = d.message,
      code = (d.user_data and d.user_data.lsp or {}).code }
  end
  return out
end

-- Wait until `done(buf)` holds and the buffer's diagnostics have not changed for 300 ms.
local function settle(buf, done)
  local last = vim.loop.now()
  vim.api.nvim_create_autocmd("DiagnosticChanged", { buffer = buf, callback = function() last = vim.loop.now() end })
  return vim.wait(timeout, function() return done(buf) and vim.loop.now() - last > 300 end, 50)
end

local function client_ids(buf)
  local ids = {}
  for id, _ in pairs(vim.lsp.buf_get_clients(buf)) do ids[#ids + 1] = id end
  table.sort(ids)
  return ids
end

function _G.Run()
  local ok, err = pcall(function()
    vim.o.hidden = true
    local main = vim.api.nvim_get_current_buf()
    local first = settle(main, function(b) return #vim.diagnostic.get(b) > 0 end)
    local before = rows(main)
    vim.cmd("edit shared.deck")
    local shared = vim.api.nvim_get_current_buf()
    vim.wait(timeout, function() return #client_ids(shared) > 0 end, 50)
    vim.wait(1000, function() return false end, 50) -- let the server read the opened file
    local last = vim.api.nvim_buf_line_count(shared)
    vim.api.nvim_buf_set_lines(shared, last, last, false, { vim.env.DECKWARD_ADDED_LINE })
    local second = settle(main, function(b)
      for _, d in ipairs(vim.diagnostic.get(b)) do
        if (d.user_data and d.user_data.lsp or {}).code == "undefined-name" then return false end
      end
      return true
    end)
    io.stdout:write(vim.fn.json_encode({
      ok = first and second, version = vim.version().minor,
      filetypes = { vim.bo[main].filetype, vim.bo[shared].filetype },
      clients = #vim.lsp.get_active_clients(), main_clients = client_ids(main), shared_clients = client_ids(shared),
      shared_modified = vim.bo[shared].modified, before = before, after = rows(main),
    }) .. "\n")
    for _, c in pairs(vim.lsp.get_active_clients()) do c.stop() end
    vim.wait(2000, function() return #vim.lsp.get_active_clients() == 0 end, 50)
  end)
  if not ok then io.stderr:write(tostring(err) .. "\n"); vim.cmd("cquit 2") end
  vim.cmd("qa!")
end
