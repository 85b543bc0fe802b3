" Loads editor-configs/vim/calami.vim in real Vim against the vim-lsp
" stand-ins in vim_lsp_standin/, fires vim-lsp's `User lsp_setup' event, and
" writes what was registered (the functions called) and the messages to JSON.
" Environment: CALAMI_TEST_CONFIG (calami.vim), CALAMI_TEST_STANDIN
" (vim_lsp_standin/), CALAMI_TEST_FILE (a file to open), CALAMI_TEST_OUT,
" and optionally CALAMI_TEST_CMD (g:calami_cmd, words separated by spaces)
" and CALAMI_TEST_SETTINGS (g:calami_settings as JSON).
set nocompatible
let &runtimepath = $CALAMI_TEST_STANDIN . ',' . &runtimepath
filetype on
if exists('$CALAMI_TEST_CMD')
  let g:calami_cmd = split($CALAMI_TEST_CMD, ' ')
endif
if exists('$CALAMI_TEST_SETTINGS')
  let g:calami_settings = json_decode($CALAMI_TEST_SETTINGS)
endif
execute 'source ' . fnameescape($CALAMI_TEST_CONFIG)
execute 'edit ' . fnameescape($CALAMI_TEST_FILE)
redir => s:messages
silent doautocmd User lsp_setup
redir END
let s:out = {'messages': s:messages, 'registered': []}
for s:info in get(g:, 'standin_registered', [])
  let s:entry = {}
  for [s:key, s:value] in items(s:info)
    if type(s:value) == v:t_func
      let s:entry[s:key] = call(s:value, [s:info])
    else
      let s:entry[s:key] = s:value
    endif
  endfor
  " The language id for some filetypes, as vim-lsp would ask for it.
  let s:entry['language_ids'] = {}
  for s:ft in ['markdown', 'rst', 'gitcommit', 'text', 'tex', 'sh', 'python']
    let &filetype = s:ft
    let s:entry['language_ids'][s:ft] = call(s:info['languageId'], [s:info])
  endfor
  call add(s:out['registered'], s:entry)
endfor
let s:out['calls'] = get(g:, 'standin_calls', [])
call writefile([json_encode(s:out)], $CALAMI_TEST_OUT)
qall!
