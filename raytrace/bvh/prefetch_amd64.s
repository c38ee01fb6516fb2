#include "textflag.h"

// func fetchNode(n *treeNode, nodes *treeNode, tris *leafTri)
//
// Prefetches what visiting n reads: for an inner node (Count = 0) the
// 64-byte child pair at nodes[Offset]; for a leaf the first and the last
// cache line of tris[Offset : Offset+Count] (40-byte triangles). Offsets
// are those of treeNode (Offset at 24, Count at 28), pinned by a test.
TEXT ·fetchNode(SB), NOSPLIT|NOFRAME, $0-24
	MOVQ n+0(FP), AX
	MOVQ nodes+8(FP), BX
	MOVQ tris+16(FP), CX
	MOVL 24(AX), DX
	MOVWLZX 28(AX), SI
	LEAQ (DX)(DX*4), DI
	LEAQ (CX)(DI*8), DI
	LEAQ (SI)(SI*4), R8
	LEAQ -1(DI)(R8*8), R8
	SHLQ $5, DX
	ADDQ BX, DX
	TESTL SI, SI
	CMOVQEQ DX, DI
	CMOVQEQ DX, R8
	PREFETCHT0 (DI)
	PREFETCHT0 (R8)
	RET
