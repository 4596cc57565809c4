#include "textflag.h"

// The lanes of the dot products of dot.go: acc holds four partial sums per
// product (one vector register); for each block of four elements the
// products (VMULPD) are added to them (VADDPD). n is a positive multiple
// of 4. Only VEX-encoded instructions, and VZEROUPPER before returning.

// func lanes1AVX2(x, y *float64, n int, acc *[4]float64)
TEXT ·lanes1AVX2(SB), NOSPLIT, $0-32
	MOVQ    x+0(FP), SI
	MOVQ    y+8(FP), R8
	MOVQ    n+16(FP), CX
	MOVQ    acc+24(FP), DI
	VMOVUPD (DI), Y0
	XORQ    AX, AX

loop1:
	VMOVUPD (SI)(AX*8), Y4
	VMULPD  (R8)(AX*8), Y4, Y5
	VADDPD  Y5, Y0, Y0
	ADDQ    $4, AX
	CMPQ    AX, CX
	JL      loop1

	VMOVUPD Y0, (DI)
	VZEROUPPER
	RET

// func lanes4AVX2(x, y0, y1, y2, y3 *float64, n int, acc *[16]float64)
TEXT ·lanes4AVX2(SB), NOSPLIT, $0-56
	MOVQ    x+0(FP), SI
	MOVQ    y0+8(FP), R8
	MOVQ    y1+16(FP), R9
	MOVQ    y2+24(FP), R10
	MOVQ    y3+32(FP), R11
	MOVQ    n+40(FP), CX
	MOVQ    acc+48(FP), DI
	VMOVUPD (DI), Y0
	VMOVUPD 32(DI), Y1
	VMOVUPD 64(DI), Y2
	VMOVUPD 96(DI), Y3
	XORQ    AX, AX

loop4:
	VMOVUPD (SI)(AX*8), Y4
	VMULPD  (R8)(AX*8), Y4, Y5
	VADDPD  Y5, Y0, Y0
	VMULPD  (R9)(AX*8), Y4, Y6
	VADDPD  Y6, Y1, Y1
	VMULPD  (R10)(AX*8), Y4, Y7
	VADDPD  Y7, Y2, Y2
	VMULPD  (R11)(AX*8), Y4, Y8
	VADDPD  Y8, Y3, Y3
	ADDQ    $4, AX
	CMPQ    AX, CX
	JL      loop4

	VMOVUPD Y0, (DI)
	VMOVUPD Y1, 32(DI)
	VMOVUPD Y2, 64(DI)
	VMOVUPD Y3, 96(DI)
	VZEROUPPER
	RET
