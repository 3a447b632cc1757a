-- deckward for Neovim 0.7 (Debian 12 ships 0.7.2): `*.deck` files get the
-- `deck` file type and the deckward language server, one server per
-- workspace (the nearest folder above the deck holding deckward.yaml or
-- .git), so every deck of a workspace and the files it `use`s share one
-- server, unsaved edits included.  0.7 has no vim.lsp.start and no vim.fs,
-- and without this its file-type detection calls a `.deck` file `conf`.
-- Use: `dofile("/path/to/deckward-0.7.lua")` in init.lua.  Set
-- vim.g.deckward_cmd = { "/path/to/deckward", "serve" } before loading it
-- when deckward is not on the PATH.
local group = vim.api.nvim_create_augroup("deckward", { clear = true })

-- `set filetype`, not `setfiletype`: it wins over the `conf` guess whichever
-- of the two runs first.
vim.api.nvim_create_autocmd({ "BufRead", "BufNewFile" }, {
  group = group,
  pattern = "*.deck",
  command = "set filetype=deck",
})

-- The nearest folder at or above `dir` holding deckward.yaml or .git (a
-- folder in a repository, a file in a git worktree), else `dir`.
local function workspace_root(dir)
  local best
  local found = {
    vim.fn.findfile("deckward.yaml", dir .. ";"),
    vim.fn.finddir(".git", dir .. ";"),
    vim.fn.findfile(".git", dir .. ";"),
  }
  for _, hit in ipairs(found) do
    if hit ~= "" then
      local root = vim.fn.fnamemodify(hit, ":p"):gsub("/$", "")
      root = vim.fn.fnamemodify(root, ":h")
      if best == nil or #root > #best then
        best = root
      end
    end
  end
  return best or dir
end

local clients = {} -- workspace root -> client id

vim.api.nvim_create_autocmd("FileType", {
  group = group,
  pattern = "deck",
  callback = function(args)
    local file = vim.api.nvim_buf_get_name(args.buf)
    local root = workspace_root(vim.fn.fnamemodify(file, ":p:h"))
    local id = clients[root]
    local client = id and vim.lsp.get_client_by_id(id)
    if client == nil or client.is_stopped() then
      id = vim.lsp.start_client({
        name = "deckward",
        cmd = vim.g.deckward_cmd or { "deckward", "serve" },
        root_dir = root,
        workspace_folders = { { uri = vim.uri_from_fname(root), name = root } },
      })
      clients[root] = id
    end
    if id then
      vim.lsp.buf_attach_client(args.buf, id)
    end
  end,
})
