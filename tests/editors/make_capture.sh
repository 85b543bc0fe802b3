#!/usr/bin/env bash
# Regenerates docs/editor-capture.txt: Neovim 0.7+ with the shipped
# editor-configs/neovim/init-minimal.lua on a copy of demo/README.md, in a
# 136x30 tmux pane, with calami's hints shown and the code-action menu open
# on "recieve".  Needs nvim and tmux; writes nothing outside a temp folder
# except the capture file.
#   tests/editors/make_capture.sh [path/to/calami]
set -euo pipefail
repo=$(cd "$(dirname "$0")/../.." && pwd)
calami=${1:-$(command -v calami)}
work=$(mktemp -d)
socket="calami-capture-$$"
cleanup() { tmux -L "$socket" kill-server 2>/dev/null || true; rm -rf "$work"; }
trap cleanup EXIT

cp -r "$repo/demo" "$work/demo"
mkdir -p "$work/home"
cd "$work/demo"
tmux -L "$socket" new-session -d -s capture -x 136 -y 30 \
  "env HOME='$work/home' XDG_CONFIG_HOME='$work/home/config' XDG_DATA_HOME='$work/home/data' \
   XDG_STATE_HOME='$work/home/state' XDG_CACHE_HOME='$work/home/cache' CALAMI_PROFILE_DIR='$work/profile' \
   CALAMI_NVIM_CMD='$calami serve' TERM=xterm-256color \
   nvim -u '$repo/editor-configs/neovim/init-minimal.lua' README.md"

# Wait (up to 30 s) until the server's hints are on screen.
for _ in $(seq 60); do
  tmux -L "$socket" send-keys -t capture ':34' Enter 'zt' 'j045l'
  sleep 0.5
  if tmux -L "$socket" capture-pane -p -t capture | grep -q "'recieve' looks misspelt"; then
    break
  fi
done
tmux -L "$socket" send-keys -t capture ':lua vim.lsp.buf.code_action()' Enter
for _ in $(seq 20); do
  sleep 0.5
  if tmux -L "$socket" capture-pane -p -t capture | grep -q '^Type number'; then
    break
  fi
done
# Drop blank lines at the top; the pane's right edge is trimmed by tmux.
tmux -L "$socket" capture-pane -p -t capture | sed '/./,$!d' > "$repo/docs/editor-capture.txt"
grep -q "^1: Replace with 'receive'" "$repo/docs/editor-capture.txt" || {
  echo "make_capture.sh: the code-action menu did not appear; see docs/editor-capture.txt" >&2
  exit 1
}
echo "wrote docs/editor-capture.txt ($(wc -l < "$repo/docs/editor-capture.txt") lines)"
