#!/bin/sh
# Writes the man page of pkarta with help2man: the overview from `pkarta --help` plus each
# command's `--help`. The degree sign (and ±, µ, ×, dashes) are carried as roff glyphs (\(de), so
# that they survive in any locale. Usage: make-man-page.sh PKARTA_BINARY OUTPUT
set -e
bin=$1
out=$2
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
# help2man runs a program with --help and --version: give it one whose text has the whole
# manual, with the degree sign replaced by a marker.
cat >"$tmp/pkarta" <<WRAP
#!/bin/sh
if [ "\$1" = "--version" ]; then exec "$bin" --version; fi
"$bin" --help
for c in \$("$bin" --help | sed -n 's/^  \([a-z]*\)  .*/\1/p'); do
  echo
  echo "pkarta \$c:"
  "$bin" "\$c" --help | sed 's/^/  /'
done
WRAP
chmod +x "$tmp/pkarta"
printf '#!/bin/sh\n"%s" "$@" | sed -e "s/\xc2\xb0/GLYPHde/g" -e "s/\xc2\xb1/GLYPHpm/g" -e "s/\xc2\xb5/GLYPHmc/g" -e "s/\xc3\x97/GLYPHmu/g" -e "s/\xe2\x80\x93/GLYPHen/g" -e "s/\xe2\x80\x94/GLYPHem/g"\n' "$tmp/pkarta" >"$tmp/wrapped"
chmod +x "$tmp/wrapped"
LC_ALL=C help2man --no-info --no-discard-stderr \
  --name="pH, buffer and solubility calculations for formulation scientists" \
  --help-option=--help --version-option=--version "$tmp/wrapped" >"$tmp/page.1"
sed -e 's/GLYPHde/\\(de/g' -e 's/GLYPHpm/\\(+-/g' -e 's/GLYPHmc/\\(mc/g' -e 's/GLYPHmu/\\(mu/g' \
  -e 's/GLYPHen/\\(en/g' -e 's/GLYPHem/\\(em/g' -e 's/^\.TH WRAPPED/.TH PKARTA/' -e 's/^wrapped \\-/pkarta \\-/' \
  -e 's/\bwrapped\b/pkarta/g' "$tmp/page.1" >"$out"
