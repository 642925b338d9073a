#!/usr/bin/env bash
# Installs the Debian packages that baleassay's tests and app need, only
# those missing. Uses apt-get as root, sudo apt-get otherwise.
set -euo pipefail

# python3-cbor2: independent CBOR decoder for the sync-file interop test.
packages=(python3 python3-cbor2)
# python3-cryptography: independent Ed25519 check of bundle signatures and authorship proofs (interop test).
packages+=(python3-cryptography)

# The field app (Gio): headers for cgo on Linux, Mesa for software
# OpenGL ES / EGL (no GPU is needed), and for its tests a virtual X
# server, xdotool to type into the real window and ImageMagick's import
# for screenshots.
packages+=(pkg-config libwayland-dev libx11-dev libx11-xcb-dev libxkbcommon-dev libxkbcommon-x11-dev
  libxcursor-dev libxfixes-dev libegl-dev libgles2 libgl1-mesa-dri libvulkan-dev mesa-vulkan-drivers
  xvfb xdotool x11-utils imagemagick)

# PostgreSQL with PostGIS: the server the publish tests start (scripts/pgtest.sh).
packages+=(postgresql postgresql-15-postgis-3)

# Chromium: the headless browser the HTML report test renders with.
packages+=(chromium)

missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
[ ${#missing[@]} -eq 0 ] && exit 0

if [ "$(id -u)" -eq 0 ]; then
  apt=(apt-get)
elif command -v sudo >/dev/null 2>&1; then
  apt=(sudo apt-get)
else
  echo "baleassay: these Debian packages are needed: ${missing[*]}" >&2
  echo "run as root, or install sudo, or install them yourself: apt-get install -y ${missing[*]}" >&2
  exit 1
fi
echo "baleassay: installing ${missing[*]}" >&2
DEBIAN_FRONTEND=noninteractive "${apt[@]}" -o DPkg::Lock::Timeout=600 update -q
DEBIAN_FRONTEND=noninteractive "${apt[@]}" -o DPkg::Lock::Timeout=600 install -y -q "${missing[@]}"
