//go:build !purego

#include "textflag.h"

// ringAVX is ringDenseGo four common rotations at a time (objective/voxel.go):
// the same products, difference, sum and quotient of the turned tip in
// each lane (x = c p0 − s p1, y = s p0 + c p1, then x/h, y/h), floor by
// truncation and one less where the truncation is above, and the word
// index floor(x/h) + nx floor(y/h) + base in float64, exact for integers
// this small. It returns false at the first group with a word outside bits.
//
// func ringAVX(bits []uint64, quad []float64, p0, p1, h, nx, base float64, mask uint64) bool
TEXT ·ringAVX(SB), NOSPLIT, $8-97
	MOVQ bits_base+0(FP), DI
	MOVQ bits_len+8(FP), R8
	MOVQ quad_base+24(FP), SI
	MOVQ quad_len+32(FP), CX
	VBROADCASTSD p0+48(FP), Y0
	VBROADCASTSD p1+56(FP), Y1
	VBROADCASTSD h+64(FP), Y2
	VBROADCASTSD nx+72(FP), Y3
	VBROADCASTSD base+80(FP), Y4
	MOVQ mask+88(FP), R9
	MOVQ $0x3FF0000000000000, AX
	MOVQ AX, one-8(SP)
	VBROADCASTSD one-8(SP), Y7
	SHRQ $3, CX
	JZ adone

aloop:
	VMOVUPD 0(SI), Y8    // cos of rotations j..j+3
	VMOVUPD 32(SI), Y9   // sin
	VMULPD Y0, Y8, Y10   // c p0
	VMULPD Y1, Y9, Y11   // s p1
	VSUBPD Y11, Y10, Y10 // x = c p0 - s p1
	VMULPD Y0, Y9, Y9    // s p0
	VMULPD Y1, Y8, Y8    // c p1
	VADDPD Y8, Y9, Y9    // y = s p0 + c p1
	VDIVPD Y2, Y10, Y10  // x/h
	VDIVPD Y2, Y9, Y9    // y/h

	VCVTTPD2DQY Y10, X11
	VCVTDQ2PD X11, Y11
	VCMPPD $1, Y11, Y10, Y12 // x/h < trunc
	VANDPD Y7, Y12, Y12
	VSUBPD Y12, Y11, Y11

	VCVTTPD2DQY Y9, X13
	VCVTDQ2PD X13, Y13
	VCMPPD $1, Y13, Y9, Y14
	VANDPD Y7, Y14, Y14
	VSUBPD Y14, Y13, Y13

	VMULPD Y3, Y13, Y13
	VADDPD Y11, Y13, Y13
	VADDPD Y4, Y13, Y13
	VCVTTPD2DQY Y13, X13
	VMOVQ X13, AX
	VMOVHLPS X13, X13, X14
	VMOVQ X14, DX
	MOVL AX, BX
	SHRQ $32, AX
	MOVL DX, R10
	SHRQ $32, DX
	CMPQ BX, R8
	JAE afail
	CMPQ AX, R8
	JAE afail
	CMPQ R10, R8
	JAE afail
	CMPQ DX, R8
	JAE afail
	ORQ R9, 0(DI)(BX*8)
	ORQ R9, 0(DI)(AX*8)
	ORQ R9, 0(DI)(R10*8)
	ORQ R9, 0(DI)(DX*8)

	ADDQ $64, SI
	DECQ CX
	JNZ aloop

adone:
	VZEROUPPER
	MOVB $1, ret+96(FP)
	RET

afail:
	VZEROUPPER
	MOVB $0, ret+96(FP)
	RET
