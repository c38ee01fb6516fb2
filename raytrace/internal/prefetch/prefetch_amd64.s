#include "textflag.h"

// func Line(p unsafe.Pointer)
TEXT ·Line(SB), NOSPLIT|NOFRAME, $0-8
	MOVQ p+0(FP), AX
	PREFETCHT0 (AX)
	RET

// func Lines(p, q unsafe.Pointer)
TEXT ·Lines(SB), NOSPLIT|NOFRAME, $0-16
	MOVQ p+0(FP), AX
	MOVQ q+8(FP), BX
	PREFETCHT0 (AX)
	PREFETCHT0 (BX)
	RET
