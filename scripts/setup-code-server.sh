#!/usr/bin/env bash
# Installs a runnable VS Code server (code-server 4.100.3 = VS Code 1.100.3) from the npm registry
# only, for the extension tests (test/extension/runInServer.mjs). Desktop VS Code cannot be
# downloaded on machines that reach only npm and Debian, so the tests run in this server build,
# whose extension host is Node 20 with real fs and worker_threads.
#
# Usage: scripts/setup-code-server.sh [DIR]   (default .vscode-test-server, git-ignored)
# A finished install leaves DIR/.complete holding the version; with it present this does nothing.
set -euo pipefail
VERSION=${CODE_SERVER_VERSION:-4.100.3}
DIR=${1:-.vscode-test-server}
MARKER="$DIR/.complete"
RIPGREP="$DIR/node_modules/code-server/lib/vscode/node_modules/@vscode/ripgrep/bin/rg"

# Workspace search (and vscode.workspace.findFiles) needs ripgrep, whose npm package downloads it
# from GitHub. Debian's `ripgrep` package serves as well: link it when it is installed.
link_ripgrep() {
  if [ ! -e "$RIPGREP" ] && command -v rg >/dev/null 2>&1 && [ -d "$(dirname "$(dirname "$RIPGREP")")" ]; then
    mkdir -p "$(dirname "$RIPGREP")" && ln -sfn "$(command -v rg)" "$RIPGREP"
  fi
}

if [ -f "$MARKER" ] && [ "$(cat "$MARKER")" = "$VERSION" ]; then
  link_ripgrep
  echo "code-server $VERSION already installed in $DIR"
  exit 0
fi
rm -f "$MARKER"
mkdir -p "$DIR"
(
  cd "$DIR"
  [ -f package.json ] || echo '{"private":true}' > package.json
  # Its postinstall would fetch ripgrep from GitHub, which these machines cannot reach: skip scripts,
  # then build the few native modules the server needs from source.
  npm install --no-audit --no-fund --ignore-scripts "code-server@$VERSION"
  npm rebuild --dangerously-allow-all-scripts argon2
  cd node_modules/code-server/lib/vscode
  npm install --no-audit --no-fund --omit=dev --ignore-scripts
  npm rebuild --dangerously-allow-all-scripts @vscode/spdlog native-watchdog @vscode/deviceid || true
  # node-pty's post-step wants npx; the .node file it needs is built before that step fails.
  npm rebuild --dangerously-allow-all-scripts node-pty >/dev/null 2>&1 || test -f node_modules/node-pty/build/Release/pty.node
  # What code-server's own postinstall.sh does.
  ln -sfn node_modules node_modules.asar
)
echo "$VERSION" > "$MARKER"
link_ripgrep
echo "code-server $VERSION installed in $DIR"
