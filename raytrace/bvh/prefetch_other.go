//go:build !amd64

package bvh

// fetchNode is a no-op where no prefetch instruction is wired in.
func fetchNode(n *treeNode, nodes *treeNode, tris *leafTri) {}
