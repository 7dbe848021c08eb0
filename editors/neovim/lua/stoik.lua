-- Starts the stoik language server (`stoik lsp`, stdio) for `stoik` buffers.
--
--   require('stoik').setup()
--   require('stoik').setup({ cmd = { '/opt/stoik/bin/stoik', 'lsp' } })
--
-- On Neovim 0.11 and later `setup` uses vim.lsp.config / vim.lsp.enable; on
-- 0.8 to 0.10 it calls vim.lsp.start from a FileType autocommand; on 0.7 it
-- starts one client per root with vim.lsp.start_client and attaches each
-- buffer.  The root is the nearest folder holding stoik.toml or .git, else
-- the file's own folder.
local M = {}

local defaults = {
  cmd = { 'stoik', 'lsp' },
  root_markers = { 'stoik.toml', '.git' },
  init_options = { inlayHints = { enable = true } },
  settings = {},
}

-- Returns the root folder for the buffer's file (works on every version:
-- vim.fs only exists from 0.8).
local function find_root(bufnr, markers)
  local name = vim.api.nvim_buf_get_name(bufnr)
  local start = name ~= '' and vim.fn.fnamemodify(name, ':p:h') or vim.fn.getcwd()
  for _, marker in ipairs(markers) do
    local hit = vim.fn.findfile(marker, start .. ';')
    if hit == '' then
      hit = vim.fn.finddir(marker, start .. ';')
    end
    if hit ~= '' then
      return (vim.fn.fnamemodify(hit, ':p:h'):gsub('/%.git$', ''))
    end
  end
  return start
end

-- Neovim 0.7 has no vim.lsp.start: keep one client per root by hand.
local clients_by_root = {}

local function start_for_buffer(bufnr, config)
  local root = find_root(bufnr, config.root_markers)
  if vim.lsp.start then
    vim.lsp.start({
      name = 'stoik',
      cmd = config.cmd,
      root_dir = root,
      init_options = config.init_options,
      settings = config.settings,
    }, { bufnr = bufnr })
    return
  end
  local id = clients_by_root[root]
  if id == nil or vim.lsp.get_client_by_id(id) == nil then
    id = vim.lsp.start_client({
      name = 'stoik',
      cmd = config.cmd,
      root_dir = root,
      init_options = config.init_options,
      settings = config.settings,
    })
    clients_by_root[root] = id
  end
  if id then
    vim.lsp.buf_attach_client(bufnr, id)
  end
end

function M.setup(opts)
  local config = vim.tbl_deep_extend('force', defaults, opts or {})

  if vim.lsp.config and vim.lsp.enable then
    vim.lsp.config('stoik', {
      cmd = config.cmd,
      filetypes = { 'stoik' },
      root_markers = config.root_markers,
      init_options = config.init_options,
      settings = config.settings,
    })
    vim.lsp.enable('stoik')
    return
  end

  vim.api.nvim_create_autocmd('FileType', {
    pattern = 'stoik',
    callback = function(args)
      start_for_buffer(args.buf, config)
    end,
  })
end

return M
