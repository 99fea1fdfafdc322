#!/bin/sh
# Regenerates the SciPy reference solutions of the built-in presets in both
# circulations: NAME.json (held) and NAME.closed.json (closed, at the stressed
# volume pvcouple calibrates when it loads the preset).
# Needs python3 with SciPy (Debian: apt-get install python3-scipy).
set -eu
cd "$(dirname "$0")/../.."
py=python3
if [ -x /usr/bin/python3 ] && /usr/bin/python3 -c 'import scipy' 2>/dev/null; then py=/usr/bin/python3; fi
go build -o /tmp/pvcouple-regen .
for name in $(ls presets/builtin/ | sed -n 's/\.yaml$//p'); do
  for circ in held closed; do
    out="testdata/reference/$name.json"
    if [ "$circ" = closed ]; then out="testdata/reference/$name.closed.json"; fi
    /tmp/pvcouple-regen solve --preset "$name" --circulation "$circ" --format json |
      "$py" testdata/reference/reference.py > "$out.tmp"
    mv "$out.tmp" "$out"
    echo "wrote $out"
  done
done
