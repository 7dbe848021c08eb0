-- Filetype detection for stoik reaction libraries: every *.stoik file gets
-- the `stoik` filetype.
if vim.fn.has('nvim-0.8') == 1 then
  vim.filetype.add({ extension = { stoik = 'stoik' } })
else
  -- Neovim 0.7 detects filetypes with filetype.vim by default, which
  -- vim.filetype.add does not reach; an autocommand does.
  vim.api.nvim_create_autocmd({ 'BufRead', 'BufNewFile' }, {
    pattern = '*.stoik',
    command = 'setfiletype stoik',
  })
end
