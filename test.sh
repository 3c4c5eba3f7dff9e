#!/usr/bin/env bash
# Runs every fieldtab test. Installs what the tests need when it is missing
# (Debian packages as root, the pinned npm reference package), regenerates the
# reference fixtures from their reference libraries and fails if they differ
# from the committed ones, then vets and runs the Go tests with the race
# detector and a short fuzz pass.
set -euo pipefail
cd "$(dirname "$0")"
export PATH="$PATH:/usr/local/go/bin"

log() { printf '== %s\n' "$*"; }

# Debian packages the tests use. Debian's python3-iapws is imported by the
# system python, not by any pyenv or venv python that may come first on PATH.
SYSPY=/usr/bin/python3
missing=()
"$SYSPY" -c 'import iapws' >/dev/null 2>&1 || missing+=(python3-iapws)
command -v node >/dev/null 2>&1 || missing+=(nodejs)
command -v npm >/dev/null 2>&1 || missing+=(npm)
# The browser tests drive Debian's Chromium (server/browser_test.go); under CI
# they fail rather than skip without it.
[ -x /usr/bin/chromium ] || missing+=(chromium)
# The report tests read the PDF back with poppler's tools and check it with
# qpdf (report/report_test.go); under CI they fail rather than skip without them.
command -v pdftotext >/dev/null 2>&1 || missing+=(poppler-utils)
command -v qpdf >/dev/null 2>&1 || missing+=(qpdf)
# The store must survive an outside sqlite3 client reading it while fieldtab
# runs (schema/durable_test.go); the test opens it with Debian's sqlite3 tool.
command -v sqlite3 >/dev/null 2>&1 || missing+=(sqlite3)
if [ "${#missing[@]}" -gt 0 ]; then
	if [ "$(id -u)" -ne 0 ]; then
		echo "test.sh: missing ${missing[*]}; run as root, or: sudo apt-get install -y ${missing[*]}" >&2
		exit 1
	fi
	log "installing ${missing[*]}"
	apt-get update -qq
	DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${missing[@]}" >/dev/null
fi

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

log "reference fixtures: regenerate and compare"
(cd testdata/psychrolib && npm ci --no-audit --no-fund --loglevel=error >/dev/null)
node testdata/psychrolib/gen.js >"$tmp/psychrolib_states.json"
"$SYSPY" testdata/iapws/gen.py >"$tmp/iapws_water.json"
for f in psychrolib_states.json iapws_water.json; do
	if ! cmp -s "$tmp/$f" "testdata/$f"; then
		echo "test.sh: testdata/$f differs from what its reference library writes now:" >&2
		diff "$tmp/$f" "testdata/$f" | head -20 >&2
		exit 1
	fi
	echo "testdata/$f matches its generator"
done

log "gofmt and go vet"
unformatted=$(gofmt -l $(git ls-files '*.go' 2>/dev/null || find . -name '*.go'))
if [ -n "$unformatted" ]; then
	echo "test.sh: gofmt would change: $unformatted" >&2
	exit 1
fi
go vet ./...

log "go test -race ./..."
go test -race -count=1 ./...

# A few seconds of each fuzz target beyond its seed corpus (which go test ran).
# The budget is a count of executions, not a duration: Go 1.26's fuzz
# coordinator can fail a target with a bare "context deadline exceeded" when a
# duration runs out under load (golang/go#75804, fixed in Go 1.27). The store's
# targets run a transaction per input, so they get fewer. FUZZTIME overrides
# every budget (a count such as 20000x, or a duration).
budget() {
	if [ -n "${FUZZTIME:-}" ]; then echo "$FUZZTIME"; return; fi
	case "$1" in
	*/schema) echo 3000x ;;
	*) echo 50000x ;;
	esac
}
log "fuzz (${FUZZTIME:-a count of executions} per target)"
for pkg in $(go list ./...); do
	for target in $(go test -list '^Fuzz' "$pkg" | grep '^Fuzz' || true); do
		go test -run '^$' -fuzz "^${target}\$" -fuzztime "$(budget "$pkg")" "$pkg" >"$tmp/fuzz.log" 2>&1 ||
			{ cat "$tmp/fuzz.log" >&2; exit 1; }
		echo "ok   $target"
	done
done
log "all tests passed"
