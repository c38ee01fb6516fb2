//go:build !amd64

package bvh

// fetchChild is a no-op where no prefetch instruction is wired in.
func fetchChild(child, count int32, nodes *wideNode, tris *leafTri) {}

// fetchTris is a no-op where no prefetch instruction is wired in.
func fetchTris(ks *int32, n int, tris *leafTri) {}
