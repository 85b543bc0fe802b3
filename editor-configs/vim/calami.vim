" calami.vim: the calami language server in Vim through the vim-lsp plugin
" (prabirshrestha/vim-lsp).  Vim 8.2+ or 9.x.
"
" Install: put this file in ~/.vim/plugin/ (or source it from your vimrc
" after vim-lsp is loaded).  Options, set before it loads:
"   let g:calami_cmd = ['calami', 'serve']      " the server command
"   let g:calami_settings = {'variant': 'en-GB'} " merged over the defaults
"   let g:calami_filetypes = [...]               " which filetypes to check
if exists('g:loaded_calami_lsp')
  finish
endif
let g:loaded_calami_lsp = 1

let s:default_settings = {
      \ 'variant': 'any',
      \ 'hintThreshold': 0.5,
      \ 'confidentThreshold': 0.95,
      \ 'severity': {'nonword': 'information', 'realword': 'hint'},
      \ 'maxSuggestions': 5,
      \ 'checkStrings': v:false,
      \ 'debounceMs': 150,
      \ 'modelPath': '',
      \ 'wordList': 'calami-lexicon.txt',
      \ }

let s:default_filetypes = [
      \ 'markdown', 'rst', 'tex', 'plaintex', 'text', 'gitcommit', 'html',
      \ 'python', 'javascript', 'javascriptreact', 'typescript', 'typescriptreact',
      \ 'rust', 'go', 'c', 'cpp', 'java', 'sh', 'bash', 'yaml', 'toml',
      \ ]

" Vim filetype -> LSP language id, where the two differ.
let s:language_ids = {
      \ 'rst': 'restructuredtext', 'tex': 'latex', 'plaintex': 'tex',
      \ 'text': 'plaintext', 'gitcommit': 'git-commit',
      \ 'sh': 'shellscript', 'bash': 'shellscript',
      \ }

let s:root_markers = ['calami.toml', 'calami-lexicon.txt', 'calami-words.txt', 'pyproject.toml', '.git/', '.git']

function! s:settings() abort
  let l:settings = deepcopy(s:default_settings)
  for [l:key, l:value] in items(get(g:, 'calami_settings', {}))
    if type(l:value) == v:t_dict && type(get(l:settings, l:key, 0)) == v:t_dict
      call extend(l:settings[l:key], l:value)
    else
      let l:settings[l:key] = l:value
    endif
  endfor
  return l:settings
endfunction

function! s:root_uri(server_info) abort
  let l:path = lsp#utils#get_buffer_path()
  let l:dir = lsp#utils#find_nearest_parent_file_directory(l:path, s:root_markers)
  return lsp#utils#path_to_uri(empty(l:dir) ? fnamemodify(l:path, ':p:h') : l:dir)
endfunction

function! s:language_id(server_info) abort
  return get(s:language_ids, &filetype, &filetype)
endfunction

" The dictionary handed to lsp#register_server (also used by the tests).
function! CalamiServerInfo() abort
  let l:cmd = get(g:, 'calami_cmd', ['calami', 'serve'])
  return {
        \ 'name': 'calami',
        \ 'cmd': {server_info -> l:cmd},
        \ 'allowlist': get(g:, 'calami_filetypes', s:default_filetypes),
        \ 'root_uri': function('s:root_uri'),
        \ 'languageId': function('s:language_id'),
        \ 'initialization_options': s:settings(),
        \ 'workspace_config': {'calami': s:settings()},
        \ }
endfunction

function! s:register() abort
  let l:program = get(g:, 'calami_cmd', ['calami', 'serve'])[0]
  if !executable(l:program)
    echohl WarningMsg
    echomsg printf("calami: the server program '%s' was not found on PATH; install calami "
          \ . "(for example `pipx install calami`) or set g:calami_cmd to its full path", l:program)
    echohl None
    return
  endif
  call lsp#register_server(CalamiServerInfo())
endfunction

augroup calami_lsp
  autocmd!
  autocmd User lsp_setup call s:register()
augroup END
