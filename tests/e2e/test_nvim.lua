-- End-to-end test of `stoik lsp` with headless Neovim (0.7 or later).
--
-- Run: WORK=<dir holding demo.stoik and stoik.toml> STOIK_BIN=<binary>
--   nvim --headless -u NONE -c "luafile tests/e2e/test_nvim.lua"
-- Exits 0 when every check passes, 1 otherwise (printing the failure).

local failures = 0
local function check(ok, what)
  if not ok then
    failures = failures + 1
    io.stderr:write("FAIL: " .. what .. "\n")
  else
    io.stderr:write("ok: " .. what .. "\n")
  end
end

local function main()
  local stoik = os.getenv("STOIK_BIN")
  local work = os.getenv("WORK")
  local file = work .. "/demo.stoik"
  vim.cmd("edit " .. file)
  local buf = vim.api.nvim_get_current_buf()
  local uri = vim.uri_from_bufnr(buf)
  local id = vim.lsp.start_client({ cmd = { stoik, "lsp" }, root_dir = work, name = "stoik" })
  check(id ~= nil, "the client started")
  vim.lsp.buf_attach_client(buf, id)

  local function diags_matching(pattern)
    local out = {}
    for _, d in ipairs(vim.diagnostic.get(buf)) do
      if d.message:find(pattern) then
        table.insert(out, d)
      end
    end
    return out
  end

  -- Diagnostics arrive for the unbalanced equation on line 6.
  local got = vim.wait(15000, function() return #diags_matching("not balanced") > 0 end, 50)
  check(got, "diagnostics for the unbalanced equation")
  local bal = diags_matching("not balanced")[1]
  check(bal ~= nil and bal.lnum == 5, "the finding is on line 6")

  -- Hover on the alias `methane`.
  local res = vim.lsp.buf_request_sync(buf, "textDocument/hover",
    { textDocument = { uri = uri }, position = { line = 5, character = 16 } }, 5000)
  local hover = res and res[id] and res[id].result
  local value = hover and hover.contents and hover.contents.value or ""
  check(value:find("C 1, H 4", 1, true) ~= nil, "hover shows the composition")

  -- The balance code action, applied through Neovim's own edit machinery.
  res = vim.lsp.buf_request_sync(buf, "textDocument/codeAction", {
    textDocument = { uri = uri },
    range = { start = { line = 5, character = 0 }, ["end"] = { line = 5, character = 40 } },
    context = { diagnostics = {} },
  }, 5000)
  local actions = res and res[id] and res[id].result or {}
  local balance
  for _, a in ipairs(actions) do
    if a.title == "balance the equation" then balance = a end
  end
  check(balance ~= nil, "a balance action is offered")
  if balance then
    vim.lsp.util.apply_workspace_edit(balance.edit, "utf-16")
  end
  local line = vim.api.nvim_buf_get_lines(buf, 5, 6, false)[1]
  check(line == "reaction burn: methane + 2 O2(g) -> CO2(g) + 2 H2O(g)", "the equation is balanced: " .. line)
  got = vim.wait(15000, function() return #diags_matching("not balanced") == 0 end, 50)
  check(got, "the finding disappears after the fix")

  -- Incremental edits after wide characters: add an unbalanced line with
  -- subscripts, ⇌, °, µ and a character outside the BMP in a comment
  -- before the equation's fix point.
  local last = vim.api.nvim_buf_line_count(buf)
  vim.api.nvim_buf_set_lines(buf, last, last, false, { "# °µ 𝛥 αβ", "reaction: H₂(g) + O₂(g) ⇌ H₂O(g) # 𝛥" })
  got = vim.wait(15000, function() return #diags_matching("not balanced") == 1 end, 50)
  check(got, "a finding for the new line")
  local d = diags_matching("not balanced")[1]
  local text = vim.api.nvim_buf_get_lines(buf, last + 1, last + 2, false)[1]
  -- Neovim turns the server's UTF-16 columns into byte columns; the
  -- equation ends where the comment starts.
  local eq_end = text:find(" #", 1, true) - 1
  check(d ~= nil and d.lnum == last + 1 and d.col == 10 and d.end_col == eq_end,
    "its range, counted in UTF-16 units, ends at byte " .. eq_end)
  -- Insert "2 " before H₂O (byte column of it in the line) and before H₂.
  local h2o = text:find("H₂O", 1, true) - 1
  vim.api.nvim_buf_set_text(buf, last + 1, h2o, last + 1, h2o, { "2 " })
  vim.api.nvim_buf_set_text(buf, last + 1, 10, last + 1, 10, { "2 " })
  got = vim.wait(15000, function() return #diags_matching("not balanced") == 0 end, 50)
  check(got, "incremental edits over wide characters balance the line")

  -- Raw requests for what Neovim 0.7 has no UI for.
  res = vim.lsp.buf_request_sync(buf, "textDocument/inlayHint", {
    textDocument = { uri = uri },
    range = { start = { line = 0, character = 0 }, ["end"] = { line = 20, character = 0 } },
  }, 5000)
  local hints = res and res[id] and res[id].result or {}
  local found = false
  for _, h in ipairs(hints) do
    if h.label == "Δn(gas) = 0; K = a(CO2) · a(H2) / (a(CO) · a(H2O))" then found = true end
  end
  check(found, "inlay hint with the K expression of `shift`")
  res = vim.lsp.buf_request_sync(buf, "textDocument/semanticTokens/full", { textDocument = { uri = uri } }, 5000)
  local toks = res and res[id] and res[id].result
  check(toks ~= nil and #toks.data > 0 and #toks.data % 5 == 0, "semantic tokens")

  -- Rename the alias through Neovim's rename handler.
  res = vim.lsp.buf_request_sync(buf, "textDocument/rename", {
    textDocument = { uri = uri }, position = { line = 3, character = 9 }, newName = "natgas",
  }, 5000)
  local edit = res and res[id] and res[id].result
  check(edit ~= nil, "rename answers")
  if edit then vim.lsp.util.apply_workspace_edit(edit, "utf-16") end
  local all = table.concat(vim.api.nvim_buf_get_lines(buf, 0, -1, false), "\n")
  local _, n = all:gsub("natgas", "")
  check(n == 2, "rename changed the declaration and the use")

  vim.lsp.stop_client(id)
end

local ok, err = pcall(main)
if not ok then
  failures = failures + 1
  io.stderr:write("FAIL: error: " .. tostring(err) .. "\n")
end
if failures > 0 then
  vim.cmd("cquit 1")
else
  vim.cmd("qall!")
end
