#!/bin/sh
# Regenerates the SciPy reference solutions of the built-in presets.
# Needs python3 with SciPy (Debian: apt-get install python3-scipy).
set -eu
cd "$(dirname "$0")/../.."
py=python3
if [ -x /usr/bin/python3 ] && /usr/bin/python3 -c 'import scipy' 2>/dev/null; then py=/usr/bin/python3; fi
go build -o /tmp/pvcouple-regen .
for name in $(/tmp/pvcouple-regen presets | awk '{print $1}'); do
  /tmp/pvcouple-regen solve --preset "$name" --format json | "$py" testdata/reference/reference.py > "testdata/reference/$name.json.tmp"
  mv "testdata/reference/$name.json.tmp" "testdata/reference/$name.json"
  echo "wrote testdata/reference/$name.json"
done
