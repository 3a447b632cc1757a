-- deckward for Neovim 0.8 or later: `*.deck` files get the `deck` file type
-- and the deckward language server, one server per workspace (the nearest
-- folder above the deck holding deckward.yaml or .git), so every deck of a
-- workspace and the files it `use`s share one server, unsaved edits included.
-- Use: copy into your config and `require("deckward")`, or `dofile()` it.
-- Set vim.g.deckward_cmd = { "/path/to/deckward", "serve" } before loading
-- it when deckward is not on the PATH.
vim.filetype.add({ extension = { deck = "deck" } })

local group = vim.api.nvim_create_augroup("deckward", { clear = true })
vim.api.nvim_create_autocmd("FileType", {
  group = group,
  pattern = "deck",
  callback = function(args)
    local file = vim.api.nvim_buf_get_name(args.buf)
    local marker = vim.fs.find({ "deckward.yaml", ".git" }, { upward = true, path = vim.fs.dirname(file) })[1]
    vim.lsp.start({
      name = "deckward",
      cmd = vim.g.deckward_cmd or { "deckward", "serve" },
      -- vim.lsp.start reuses the running client of the same name and root.
      root_dir = marker and vim.fs.dirname(marker) or vim.fs.dirname(file),
    }, { bufnr = args.buf })
  end,
})
