package bvh

// fetchNode asks the processor to start loading what visiting n will read
// (its child pair, or its triangles) without waiting for it; see the
// assembly for the layout it assumes.
//
//go:noescape
func fetchNode(n *treeNode, nodes *treeNode, tris *leafTri)
