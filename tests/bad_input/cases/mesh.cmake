# Mesh bounds that leave out observed sizes (exit 3, at the bound's key and line).
safesite_bad_input(NAME mesh-upper-cuts-observed ARGS "run|inputs/mesh-upper-cuts.toml" STATUS 3
                   FIRST "^safesite: error: inputs/mesh-upper-cuts.toml:27:[0-9]*: .*mesh.upper")
safesite_bad_input(NAME mesh-negative-eviction-warning
                   ARGS "run|inputs/mesh-negative-eviction-warning.toml" STATUS 3
                   FIRST "^safesite: error: inputs/mesh-negative-eviction-warning.toml:27:[0-9]*: .*eviction_warning")
