#!/bin/sh
# Renders a sheaf result workbook to PNG pages, to look at it as a colleague
# would on paper. Needs LibreOffice (headless) and poppler-utils:
#   apt-get install -y libreoffice-calc-nogui poppler-utils
# Not used by the tests.
#
# Usage: tools/render.sh RESULT.xlsx [OUT_DIR] [DPI]
# Without RESULT.xlsx, runs the demo month first (workbooks/).
set -eu
here=$(cd "$(dirname "$0")/.." && pwd)
out_dir=${2:-/tmp/sheaf-render}
dpi=${3:-50}
mkdir -p "$out_dir"
if [ $# -ge 1 ]; then
    result=$1
else
    result=$out_dir/demo.xlsx
    cargo run --release --manifest-path "$here/Cargo.toml" -- run \
        "$here/workbooks/depot-monthly.sheaf" \
        --data "$here/workbooks/depot-2026-10.xlsx" --out "$result" --force
fi
# A profile of its own, so a LibreOffice already running (or another
# render at the same time) does not make this one wait or fail.
soffice -env:UserInstallation="file://$out_dir/profile" --headless \
    --convert-to pdf --outdir "$out_dir" "$result" >/dev/null
pdf=$out_dir/$(basename "${result%.*}").pdf
rm -f "$out_dir"/page-*.png
pdftoppm -png -r "$dpi" "$pdf" "$out_dir/page"
pages=$(ls "$out_dir"/page-*.png | wc -l)
echo "$pages pages: $out_dir/page-*.png (PDF: $pdf)"
