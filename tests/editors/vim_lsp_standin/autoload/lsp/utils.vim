" Stand-ins for the vim-lsp helpers calami.vim calls, recording their arguments.
let g:standin_calls = []
function! lsp#utils#get_buffer_path(...) abort
  return expand('%:p')
endfunction
function! lsp#utils#find_nearest_parent_file_directory(path, markers) abort
  call add(g:standin_calls, ['find_nearest_parent_file_directory', a:path, a:markers])
  return fnamemodify(a:path, ':h')
endfunction
function! lsp#utils#path_to_uri(path) abort
  return 'file://' . a:path
endfunction
