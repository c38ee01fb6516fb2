module github.com/hemiray/hemiray

go 1.26

require github.com/hschendel/stl v1.0.4
