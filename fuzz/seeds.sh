#!/bin/sh
# Copy the valid fixtures of each reader into fuzz/corpus/<reader>/ (the working corpora;
# atheris adds what it finds there). Usage: fuzz/seeds.sh
set -e
cd "$(dirname "$0")/.."
for reader in edif spice bom settings parts; do mkdir -p "fuzz/corpus/$reader"; done
find fixtures -name '*.edif' -not -path '*/bad/*' -exec cp {} fuzz/corpus/edif/ \;
find fixtures -name '*.cir' -not -path '*/bad/*' -exec cp {} fuzz/corpus/spice/ \;
find fixtures -name '*.csv' -not -path '*/bad/*' -exec cp {} fuzz/corpus/bom/ \;
find fixtures -name 'ledlint.toml' -not -path '*/bad/*' -exec sh -c 'cp "$1" "fuzz/corpus/settings/$(echo "$1" | tr / _)"' _ {} \;
cp fixtures/config/extra_parts.toml fuzz/corpus/parts/
