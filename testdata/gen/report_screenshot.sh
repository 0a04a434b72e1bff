#!/bin/sh
# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
#
# report_screenshot.sh renders the HTML report of the demo's well-sized
# model in headless Chromium (Debian's chromium package, installed with
# apt-get when missing), saves a screenshot, and fails if the browser
# logs a console error or if the rendered page lacks any of the report's
# <svg> plots. Not part of CI. Run from the repository root:
#
#	sh testdata/gen/report_screenshot.sh [OUTDIR]
set -eu
out=${1:-$(mktemp -d)}
mkdir -p "$out"
if ! command -v chromium >/dev/null 2>&1; then
	apt-get update && apt-get install -y chromium
fi
go run ./cmd/crease demo --dir "$out" >/dev/null
go run ./cmd/crease report "$out/arm_wide.json" --out "$out/report.html"
want=$(grep -o '<svg' "$out/report.html" | wc -l)
flags="--headless --no-sandbox --disable-gpu --disable-quic --no-first-run --disable-background-networking --disable-component-update --disable-sync"
chromium $flags --user-data-dir="$(mktemp -d)" --enable-logging=stderr --v=0 \
	--window-size=1200,2400 --screenshot="$out/report.png" "file://$(realpath "$out/report.html")" 2>"$out/chromium.log" || true
chromium $flags --user-data-dir="$(mktemp -d)" --dump-dom "file://$(realpath "$out/report.html")" >"$out/dom.html" 2>/dev/null
got=$(grep -o '<svg' "$out/dom.html" | wc -l)
echo "report: $out/report.html; screenshot: $out/report.png; <svg> in page $want, in rendered DOM $got"
if grep -E 'Uncaught|CONSOLE\(|console.error' "$out/chromium.log"; then
	echo "console errors (see $out/chromium.log)" >&2
	exit 1
fi
if [ "$got" -ne "$want" ] || [ "$want" -eq 0 ] || [ ! -s "$out/report.png" ]; then
	echo "rendered page is missing plots or the screenshot is empty" >&2
	exit 1
fi
echo ok
