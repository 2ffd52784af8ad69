#!/usr/bin/env bash
# `npm run build:native`: builds the engine's native backend (reduction/native, a Node-API addon over
# Debian's OpenBLAS/LAPACKE and SuiteSparse) with node-gyp against Node's own installed headers
# (--nodedir: nothing is downloaded). Installs the Debian development packages first when missing.
# Rebuilds only when a source is newer than the built addon, unless --force.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/env.sh"
cd "$REPO_ROOT"
FORCE=0
[ "${1:-}" = "--force" ] && FORCE=1
ensure_native_build_packages
OUT="reduction/native/build/Release/modeshelf_native.node"
if [ "$FORCE" = 0 ] && [ -f "$OUT" ] && [ -z "$(find reduction/native/src reduction/native/binding.gyp -newer "$OUT" 2>/dev/null)" ]; then
  log "native addon up to date ($OUT)"
  exit 0
fi
NODEDIR="$(node_header_dir)" || die "Node's C headers (node_api.h) were not found next to $(command -v node); install Node.js 20 with its headers (Debian's nodejs package ships them)"
log "building the native addon (node-gyp, headers from $NODEDIR)"
JOBS="$(nproc 2>/dev/null || echo 2)"
node "$REPO_ROOT/node_modules/node-gyp/bin/node-gyp.js" rebuild --directory=reduction/native --nodedir="$NODEDIR" -j "$JOBS" --loglevel=warn \
  || die "building the native addon failed (see the compiler output above)"
node -e '
  const m = { exports: {} };
  process.dlopen(m, process.argv[1]);
  if (typeof m.exports.gemm !== "function") process.exit(1);
' "$REPO_ROOT/$OUT" || die "the native addon was built but does not load"
log "native addon built: $OUT"
