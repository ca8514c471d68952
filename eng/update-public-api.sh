#!/usr/bin/env bash
# Adds every symbol the PublicApiAnalyzers report as undeclared (RS0016) to PublicAPI.Unshipped.txt
# and drops entries it reports as no longer present (RS0017). Review the diff: an API change must
# be deliberate.
set -euo pipefail
cd "$(dirname "$0")/.."
for proj in src/*/; do
  [ -f "$proj/PublicAPI.Unshipped.txt" ] || continue
  log=$(mktemp)
  dotnet build "$proj" -c Release --no-incremental -p:TreatWarningsAsErrors=false 2>&1 > "$log" || true
  python3 - "$proj" "$log" <<'PY'
import re, sys, pathlib
proj, log = pathlib.Path(sys.argv[1]), open(sys.argv[2]).read()
add = set(re.findall(r"RS0016: Symbol '(.+?)' is not part of the declared public API", log))
remove = set(re.findall(r"RS0017: Symbol '(.+?)' is part of the declared API, but is either not public or could not be found", log))
f = proj / "PublicAPI.Unshipped.txt"
lines = [l for l in f.read_text().splitlines() if l.strip()]
body = sorted((set(lines[1:]) | add) - remove)
f.write_text("\n".join([lines[0]] + body) + "\n")
print(f"{proj}: +{len(add)} -{len(remove)}")
PY
  rm -f "$log"
done
