#!/usr/bin/env bash
# Legwork's two commands (see README.md, "Quick start"):
#   ./dev.sh demo   set up, load the invented demo shop into SQLite, serve http://127.0.0.1:8000
#   ./dev.sh test   set up, then run the whole test suite (extra arguments go to pytest)
# Safe to run again: packages and the virtualenv are only installed when missing or changed.
set -euo pipefail
cd "$(dirname "$0")"

# Debian packages: WeasyPrint draws PDFs with Pango/HarfBuzz and needs a font; the tablet tests drive
# Debian's headless Chromium through chromedriver.
RUN_PACKAGES=(python3 python3-venv libpango-1.0-0 libpangoft2-1.0-0 libharfbuzz0b fonts-dejavu-core)
TEST_PACKAGES=(chromium chromium-driver)
# On PostgreSQL, `manage.py backup` and `restore` run pg_dump and pg_restore (same major version as the server).
POSTGRES_PACKAGES=(postgresql-client)

say() { printf '\033[1m[legwork]\033[0m %s\n' "$*"; }

need_packages() {
  command -v dpkg >/dev/null 2>&1 || { say "Not a Debian system: make sure these are installed: $*"; return 0; }
  local missing=()
  for pkg in "$@"; do dpkg -s "$pkg" >/dev/null 2>&1 || missing+=("$pkg"); done
  [ ${#missing[@]} -eq 0 ] && return 0
  say "Installing Debian packages: ${missing[*]}"
  local sudo=""
  if [ "$(id -u)" -ne 0 ]; then
    if command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then sudo="sudo"; else
      say "These Debian packages are missing and I cannot install them without root: ${missing[*]}"
      say "Run:  sudo apt-get install -y ${missing[*]}   then run this command again."
      exit 1
    fi
  fi
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
}

pick_python() {
  for candidate in python3.11 python3.12 python3; do
    if command -v "$candidate" >/dev/null 2>&1 &&
       "$candidate" -c 'import sys; sys.exit(0 if (3, 11) <= sys.version_info[:2] < (3, 13) else 1)'; then
      echo "$candidate"; return 0
    fi
  done
  say "Python 3.11 or 3.12 is needed (Debian 12: apt-get install python3)."; exit 1
}

setup() {
  need_packages "${RUN_PACKAGES[@]}"
  case "${DATABASE_URL:-}" in postgres*) need_packages "${POSTGRES_PACKAGES[@]}" ;; esac
  local python; python=$(pick_python)
  if [ ! -x .venv/bin/python ]; then
    say "Creating the virtualenv in .venv"
    "$python" -m venv .venv
  fi
  local stamp=.venv/.requirements.sha256 want
  want=$(sha256sum requirements.txt | cut -d' ' -f1)
  if [ "$(cat "$stamp" 2>/dev/null)" != "$want" ]; then
    say "Installing Python packages from requirements.txt"
    .venv/bin/python -m pip install -q --upgrade pip
    .venv/bin/python -m pip install -q -r requirements.txt
    echo "$want" > "$stamp"
  fi
}

case "${1:-}" in
  demo)
    setup
    # The demo shop's name on its documents, and the address its travelers' QR codes open (see README, Deploying).
    export LEGWORK_SHOP_NAME="${LEGWORK_SHOP_NAME:-Brannock Steelworks (demo)}"
    export LEGWORK_BASE_URL="${LEGWORK_BASE_URL:-http://127.0.0.1:8000}"
    .venv/bin/python manage.py migrate --noinput -v0
    .venv/bin/python manage.py load_demo
    say "Serving Legwork with the demo shop at http://127.0.0.1:8000 (Ctrl-C stops it)"
    exec .venv/bin/python manage.py runserver 127.0.0.1:8000
    ;;
  test)
    shift
    setup
    need_packages "${TEST_PACKAGES[@]}"
    exec .venv/bin/python -m pytest "$@"
    ;;
  *)
    echo "usage: ./dev.sh demo | ./dev.sh test [pytest arguments]" >&2
    exit 2
    ;;
esac
