#include "textflag.h"

// func fetchChild(child, count int32, nodes *wideNode, tris *leafTri)
//
// Prefetches what visiting a child reads: for an inner child (count = 0)
// the two cache lines of the 128-byte wide node nodes[child]; for a leaf
// the first and the last cache line of tris[child : child+count] (40-byte
// triangles). The sizes are pinned by a test.
TEXT ·fetchChild(SB), NOSPLIT|NOFRAME, $0-24
	MOVLQSX child+0(FP), AX
	MOVLQSX count+4(FP), SI
	MOVQ nodes+8(FP), BX
	MOVQ tris+16(FP), CX
	LEAQ (AX)(AX*4), DI
	LEAQ (CX)(DI*8), DI
	LEAQ (SI)(SI*4), R8
	LEAQ -1(DI)(R8*8), R8
	SHLQ $7, AX
	ADDQ BX, AX
	LEAQ 64(AX), DX
	TESTL SI, SI
	CMOVQEQ AX, DI
	CMOVQEQ DX, R8
	PREFETCHT0 (DI)
	PREFETCHT0 (R8)
	RET

// func fetchTris(ks *int32, n int, tris *leafTri)
//
// Prefetches the first and last byte of tris[ks[i]] for i < n (n > 0):
// the facets of a grid cell (40-byte triangles, which may straddle a
// cache line).
TEXT ·fetchTris(SB), NOSPLIT|NOFRAME, $0-24
	MOVQ ks+0(FP), SI
	MOVQ n+8(FP), CX
	MOVQ tris+16(FP), BX
loop:
	MOVLQSX (SI), AX
	LEAQ (AX)(AX*4), AX
	LEAQ (BX)(AX*8), AX
	PREFETCHT0 (AX)
	PREFETCHT0 39(AX)
	ADDQ $4, SI
	DECQ CX
	JNZ loop
	RET
