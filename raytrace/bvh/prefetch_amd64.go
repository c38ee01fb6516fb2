package bvh

// fetchChild asks the processor to start loading what visiting a child
// will read (both cache lines of wide node nodes[child] when count is 0,
// else the first and last cache line of tris[child : child+count]) without
// waiting for it; see the assembly for the layout it assumes.
//
//go:noescape
func fetchChild(child, count int32, nodes *wideNode, tris *leafTri)

// fetchTris asks the processor to start loading triangles tris[ks[i]] for
// i < n (n > 0), the facets of a grid cell.
//
//go:noescape
func fetchTris(ks *int32, n int, tris *leafTri)
