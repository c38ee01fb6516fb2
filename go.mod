module github.com/hemiray/hemiray

go 1.26.0

require github.com/hschendel/stl v1.0.4

require golang.org/x/sync v0.25.0
