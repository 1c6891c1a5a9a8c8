# Mesh bounds that leave out observed sizes (exit 3, at the bound's key and line).
safesite_bad_input(NAME mesh-upper-cuts-observed ARGS "run|inputs/mesh-upper-cuts.toml" STATUS 3
                   FIRST "^safesite: error: inputs/mesh-upper-cuts.toml:27:[0-9]*: .*mesh.upper")
