-- Headless Neovim (0.7+) end-to-end test of the Trialbook language server through Neovim's built-in
-- LSP client: a diagnostic for an unknown level, a hover with the ANOVA table, and the quick fix that
-- declares the level (applied, then the error is gone). Waits for signals, never fixed sleeps.
-- Run:  TRIALBOOK_SERVER=dist/server.cjs TRIALBOOK_SAMPLE=samples/two-factor.trial \
--         nvim --headless -u NONE -c 'luafile test/e2e/nvim-lsp.e2e.lua'
-- Exit status: 0 = all checks passed, 1 = failure (see stderr).
local function out(s) io.stdout:write(s .. '\n') end
local function fail(msg)
  io.stderr:write('FAIL: ' .. msg .. '\n')
  vim.cmd('cquit 1')
end

local ok, err = pcall(function()
  local server = vim.fn.fnamemodify(os.getenv('TRIALBOOK_SERVER') or 'dist/server.cjs', ':p')
  local sample = os.getenv('TRIALBOOK_SAMPLE') or 'samples/two-factor.trial'
  local timeout = tonumber(os.getenv('TRIALBOOK_TIMEOUT_MS') or '15000')
  if vim.fn.filereadable(server) == 0 then return fail('server not found: ' .. server) end

  -- The invented two-factor sample with one run whose resin is not a declared level.
  local lines = vim.fn.readfile(sample)
  local planted = false
  for i, l in ipairs(lines) do
    if l:find('r18  virgin   40 ', 1, true) then
      lines[i] = l:gsub('r18  virgin   40 ', 'r18  recycled 40 ')
      planted = true
    end
  end
  if not planted then return fail('the sample changed: cannot plant the unknown level') end
  local dir = vim.fn.tempname()
  vim.fn.mkdir(dir, 'p')
  local file = dir .. '/cover.trial'
  vim.fn.writefile(lines, file)

  vim.cmd('edit ' .. vim.fn.fnameescape(file))
  local bufnr = vim.api.nvim_get_current_buf()
  vim.bo[bufnr].filetype = 'trial'   -- -u NONE: no filetype detection; this becomes the languageId

  local exited = nil
  local client_id = vim.lsp.start_client({
    name = 'trialbook',
    cmd = { 'node', server, '--stdio' },
    root_dir = dir,
    on_exit = function(code, signal) exited = { code, signal } end,
  })
  if not client_id then return fail('start_client returned nil') end
  vim.lsp.buf_attach_client(bufnr, client_id)

  -- 1) the unknown-level error
  local function unknown_level()
    for _, d in ipairs(vim.diagnostic.get(bufnr)) do
      if d.code == 'unknown-level' then return d end
    end
    return nil
  end
  local got = vim.wait(timeout, function() return unknown_level() ~= nil or exited ~= nil end, 50)
  local d = unknown_level()
  if not got or not d then
    return fail('no unknown-level diagnostic within ' .. timeout .. ' ms' .. (exited and (' (server exited ' .. vim.inspect(exited) .. ')') or ''))
  end
  out(string.format('DIAGNOSTIC %d:%d severity=%d code=%s: %s', d.lnum + 1, d.col + 1, d.severity, tostring(d.code), d.message))
  if d.severity ~= vim.diagnostic.severity.ERROR or not d.message:find("'recycled'", 1, true) then
    return fail('unexpected diagnostic: ' .. vim.inspect(d))
  end

  -- 2) hover on the response name "shrink" (line "response shrink ...")
  local row = nil
  for i, l in ipairs(vim.api.nvim_buf_get_lines(bufnr, 0, -1, false)) do
    if l:match('^response shrink') then row = i end
  end
  vim.api.nvim_win_set_cursor(0, { row, 10 })
  local responses, herr = vim.lsp.buf_request_sync(bufnr, 'textDocument/hover', vim.lsp.util.make_position_params(), timeout)
  if not responses or not responses[client_id] or not responses[client_id].result then return fail('no hover: ' .. tostring(herr)) end
  local text = table.concat(vim.lsp.util.convert_input_to_markdown_lines(responses[client_id].result.contents), '\n')
  local anova = text:match('| Source.-\n\n') or text
  out('HOVER ' .. anova:gsub('\n', '\n      '))
  if not text:find('| resin x mold-temp |', 1, true) then return fail('the hover has no ANOVA row for the interaction') end

  -- 3) the quick fix at the diagnostic: declare the level, apply it, and the error goes away
  local params = {
    textDocument = vim.lsp.util.make_text_document_params(bufnr),
    range = { start = { line = d.lnum, character = d.col }, ['end'] = { line = d.end_lnum, character = d.end_col } },
    context = { diagnostics = vim.lsp.diagnostic.get_line_diagnostics(bufnr, d.lnum) },
  }
  local actions = vim.lsp.buf_request_sync(bufnr, 'textDocument/codeAction', params, timeout)
  local fix = nil
  for _, a in ipairs((actions and actions[client_id] and actions[client_id].result) or {}) do
    if a.title:find("Declare 'recycled'", 1, true) then fix = a end
  end
  if not fix or not fix.edit then return fail('no quick fix that declares the level: ' .. vim.inspect(actions)) end
  out('CODE ACTION ' .. fix.title)
  vim.lsp.util.apply_workspace_edit(fix.edit, 'utf-16')
  local fixed = vim.wait(timeout, function() return unknown_level() == nil end, 50)
  if not fixed then return fail('the error stayed after the quick fix') end
  local declared = false
  for _, l in ipairs(vim.api.nvim_buf_get_lines(bufnr, 0, -1, false)) do
    if l:find('levels virgin, regrind, recycled', 1, true) then declared = true end
  end
  if not declared then return fail('the quick fix did not declare the level') end
  out('FIXED the level is declared and the unknown-level error is gone')

  vim.lsp.stop_client(client_id)
  vim.wait(3000, function() return exited ~= nil end, 50)
  out('PASS nvim ' .. tostring(vim.version().major) .. '.' .. tostring(vim.version().minor) .. '.' .. tostring(vim.version().patch) .. ' (server exit: ' .. vim.inspect(exited) .. ')')
  vim.cmd('qall!')
end)
if not ok then fail('lua error: ' .. tostring(err)) end
