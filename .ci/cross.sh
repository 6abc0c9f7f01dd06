#!/usr/bin/env bash
# Builds the plumb binary for linux, darwin and windows on amd64 and arm64:
# static, cgo-free (CGO_ENABLED=0), with -trimpath (no path of the build
# machine inside), each reporting the version of cmd/plumb/version.go.
#
# Usage: bash .ci/cross.sh [OUTDIR]   (default: dist)
#
# Writes OUTDIR/plumb-VERSION-OS-ARCH (".exe" on windows) and
# OUTDIR/SHA256SUMS, then checks every binary: `go version -m` must record
# the target's GOOS and GOARCH, CGO_ENABLED=0 and -trimpath; a linux binary
# must be statically linked (when `file` is installed); and the binaries
# this machine can run (its own, and linux/arm64 under qemu-aarch64-static
# when installed) must print the expected version and OS/ARCH. Each binary
# is first built under a temporary name in OUTDIR and renamed into place,
# so an interrupted build leaves no half-written binary. Needs only Go.
set -euo pipefail
cd "$(dirname "$0")/.."
out=${1:-dist}
mkdir -p "$out"
targets="linux/amd64 linux/arm64 darwin/amd64 darwin/arm64 windows/amd64 windows/arm64"

# The version every JSON result and `plumb version` report (bumped in
# version.go, and only there, on a release).
version=$(sed -nE 's/^const version = "([^"]+)"$/\1/p' cmd/plumb/version.go)
if [ -z "$version" ]; then
  echo "cross.sh: no 'const version = \"...\"' line in cmd/plumb/version.go"; exit 1
fi
echo "plumb $version, built by $(go env GOVERSION) on $(go env GOHOSTOS)/$(go env GOHOSTARCH)"

fail=0
names=()
start=$(date +%s)
for target in $targets; do
  goos=${target%/*} goarch=${target#*/}
  name="plumb-$version-$goos-$goarch"
  [ "$goos" = windows ] && name="$name.exe"
  t0=$(date +%s)
  part="$out/.$name.part"
  rm -f "$part"
  if ! CGO_ENABLED=0 GOOS=$goos GOARCH=$goarch go build -trimpath -o "$part" ./cmd/plumb; then
    echo "FAIL $target: go build failed"; rm -f "$part"; fail=1; continue
  fi
  mv -f "$part" "$out/$name"
  names+=("$name")
  echo "built $out/$name ($(( $(wc -c < "$out/$name") / 1024 )) KiB, $(( $(date +%s) - t0 )) s)"
done
echo "six targets built in $(( $(date +%s) - start )) s"

# check TARGET FILE: the build information, linkage and, where this machine
# can run it, the version line.
check() {
  local target=$1 file=$2 goos=${1%/*} goarch=${1#*/}
  local info; info=$(go version -m "$file") || { echo "FAIL $target: go version -m $file failed"; fail=1; return; }
  local want
  for want in "build	GOOS=$goos" "build	GOARCH=$goarch" "build	CGO_ENABLED=0" "build	-trimpath=true"; do
    if ! printf '%s\n' "$info" | grep -qF "$want"; then
      echo "FAIL $target: the build information of $file lacks '$want'"; fail=1
    fi
  done
  if [ "$goos" = linux ] && command -v file > /dev/null; then
    if ! file -b "$file" | grep -q 'statically linked'; then
      echo "FAIL $target: $file is not statically linked: $(file -b "$file")"; fail=1
    fi
  fi
  local runner=()
  if [ "$goos" = "$(go env GOHOSTOS)" ] && [ "$goarch" = "$(go env GOHOSTARCH)" ]; then
    runner=()
  elif [ "$target" = linux/arm64 ] && command -v qemu-aarch64-static > /dev/null; then
    runner=(qemu-aarch64-static)
  else
    echo "checked $target: build information$( [ "$goos" = linux ] && command -v file > /dev/null && echo ", static")"
    return
  fi
  local line
  line=$("${runner[@]}" "$file" version) || { echo "FAIL $target: '$file version' failed"; fail=1; return; }
  case "$line" in
    "plumb $version $goos/$goarch "*) echo "checked $target: build information, runs${runner:+ under ${runner[0]}}: $line" ;;
    *) echo "FAIL $target: '$file version' printed '$line', want 'plumb $version $goos/$goarch (...)'"; fail=1 ;;
  esac
}
for target in $targets; do
  goos=${target%/*} goarch=${target#*/}
  name="plumb-$version-$goos-$goarch"
  [ "$goos" = windows ] && name="$name.exe"
  [ -f "$out/$name" ] && check "$target" "$out/$name"
done

if [ ${#names[@]} -gt 0 ]; then
  (cd "$out" && sha256sum "${names[@]}" > .SHA256SUMS.part && mv -f .SHA256SUMS.part SHA256SUMS)
  echo "wrote $out/SHA256SUMS"
fi
exit $fail
