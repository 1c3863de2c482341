//go:build !purego

#include "textflag.h"

// func dotFMA(x, y []float64) float64
//
// Σ x[i]·y[i] over len(x) terms with AVX2 fused multiply-adds: four
// accumulators of four doubles (16 terms a step), then four, then one.
TEXT ·dotFMA(SB), NOSPLIT, $0-56
	MOVQ   x_base+0(FP), SI
	MOVQ   x_len+8(FP), CX
	MOVQ   y_base+24(FP), DI
	VXORPD Y0, Y0, Y0
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2
	VXORPD Y3, Y3, Y3
	XORQ   AX, AX
	MOVQ   CX, BX
	ANDQ   $-16, BX
	JZ     four

sixteen:
	VMOVUPD     (SI)(AX*8), Y4
	VMOVUPD     32(SI)(AX*8), Y5
	VMOVUPD     64(SI)(AX*8), Y6
	VMOVUPD     96(SI)(AX*8), Y7
	VFMADD231PD (DI)(AX*8), Y4, Y0
	VFMADD231PD 32(DI)(AX*8), Y5, Y1
	VFMADD231PD 64(DI)(AX*8), Y6, Y2
	VFMADD231PD 96(DI)(AX*8), Y7, Y3
	ADDQ        $16, AX
	CMPQ        AX, BX
	JL          sixteen

four:
	MOVQ CX, BX
	ANDQ $-4, BX
	CMPQ AX, BX
	JGE  reduce

fourloop:
	VMOVUPD     (SI)(AX*8), Y4
	VFMADD231PD (DI)(AX*8), Y4, Y0
	ADDQ        $4, AX
	CMPQ        AX, BX
	JL          fourloop

reduce:
	VADDPD       Y1, Y0, Y0
	VADDPD       Y3, Y2, Y2
	VADDPD       Y2, Y0, Y0
	VEXTRACTF128 $1, Y0, X1
	VADDPD       X1, X0, X0
	VHADDPD      X0, X0, X0
	CMPQ         AX, CX
	JGE          done

one:
	VMOVSD      (SI)(AX*8), X4
	VFMADD231SD (DI)(AX*8), X4, X0
	INCQ        AX
	CMPQ        AX, CX
	JL          one

done:
	VZEROUPPER
	MOVSD X0, ret+48(FP)
	RET

// func hasAVX2FMA() bool
//
// CPUID: FMA (leaf 1 ECX bit 12), OSXSAVE (bit 27), AVX (bit 28); XGETBV:
// the OS saves the XMM and YMM state (XCR0 bits 1 and 2); AVX2 (leaf 7 EBX
// bit 5).
TEXT ·hasAVX2FMA(SB), NOSPLIT, $0-1
	MOVL $1, AX
	XORL CX, CX
	CPUID
	ANDL $0x18001000, CX
	CMPL CX, $0x18001000
	JNE  no
	XORL CX, CX
	BYTE $0x0f; BYTE $0x01; BYTE $0xd0 // XGETBV
	ANDL $6, AX
	CMPL AX, $6
	JNE  no
	MOVL $7, AX
	XORL CX, CX
	CPUID
	ANDL $0x20, BX
	JZ   no
	MOVB $1, ret+0(FP)
	RET

no:
	MOVB $0, ret+0(FP)
	RET

// func dot4FMA(x, y0, y1, y2, y3 []float64) (s0, s1, s2, s3 float64)
//
// The four sums Σ x[i]·yk[i] over len(x) terms, reading x once: eight
// accumulators (two per sum) of four doubles, eight terms a step, then
// one term a step.
TEXT ·dot4FMA(SB), NOSPLIT, $0-152
	MOVQ   x_base+0(FP), SI
	MOVQ   x_len+8(FP), CX
	MOVQ   y0_base+24(FP), R8
	MOVQ   y1_base+48(FP), R9
	MOVQ   y2_base+72(FP), R10
	MOVQ   y3_base+96(FP), R11
	VXORPD Y0, Y0, Y0
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2
	VXORPD Y3, Y3, Y3
	VXORPD Y4, Y4, Y4
	VXORPD Y5, Y5, Y5
	VXORPD Y6, Y6, Y6
	VXORPD Y7, Y7, Y7
	XORQ   AX, AX
	MOVQ   CX, BX
	ANDQ   $-8, BX
	JZ     reduce4

eight4:
	VMOVUPD     (SI)(AX*8), Y8
	VMOVUPD     32(SI)(AX*8), Y9
	VFMADD231PD (R8)(AX*8), Y8, Y0
	VFMADD231PD (R9)(AX*8), Y8, Y1
	VFMADD231PD (R10)(AX*8), Y8, Y2
	VFMADD231PD (R11)(AX*8), Y8, Y3
	VFMADD231PD 32(R8)(AX*8), Y9, Y4
	VFMADD231PD 32(R9)(AX*8), Y9, Y5
	VFMADD231PD 32(R10)(AX*8), Y9, Y6
	VFMADD231PD 32(R11)(AX*8), Y9, Y7
	ADDQ        $8, AX
	CMPQ        AX, BX
	JL          eight4

reduce4:
	VADDPD       Y4, Y0, Y0
	VADDPD       Y5, Y1, Y1
	VADDPD       Y6, Y2, Y2
	VADDPD       Y7, Y3, Y3
	VEXTRACTF128 $1, Y0, X4
	VADDPD       X4, X0, X0
	VHADDPD      X0, X0, X0
	VEXTRACTF128 $1, Y1, X5
	VADDPD       X5, X1, X1
	VHADDPD      X1, X1, X1
	VEXTRACTF128 $1, Y2, X6
	VADDPD       X6, X2, X2
	VHADDPD      X2, X2, X2
	VEXTRACTF128 $1, Y3, X7
	VADDPD       X7, X3, X3
	VHADDPD      X3, X3, X3
	CMPQ         AX, CX
	JGE          done4

one4:
	VMOVSD      (SI)(AX*8), X8
	VFMADD231SD (R8)(AX*8), X8, X0
	VFMADD231SD (R9)(AX*8), X8, X1
	VFMADD231SD (R10)(AX*8), X8, X2
	VFMADD231SD (R11)(AX*8), X8, X3
	INCQ        AX
	CMPQ        AX, CX
	JL          one4

done4:
	VZEROUPPER
	MOVSD X0, s0+120(FP)
	MOVSD X1, s1+128(FP)
	MOVSD X2, s2+136(FP)
	MOVSD X3, s3+144(FP)
	RET

// func dot4x2FMA(x0, x1, y0, y1, y2, y3 []float64, s *[8]float64)
//
// The eight sums Σ xj[i]·yk[i] over len(x0) terms (s[2k+j]), each yk read
// once for both x: eight accumulators of four doubles, four terms a step,
// then one term a step.
TEXT ·dot4x2FMA(SB), NOSPLIT, $0-152
	MOVQ   x0_base+0(FP), SI
	MOVQ   x0_len+8(FP), CX
	MOVQ   x1_base+24(FP), DI
	MOVQ   y0_base+48(FP), R8
	MOVQ   y1_base+72(FP), R9
	MOVQ   y2_base+96(FP), R10
	MOVQ   y3_base+120(FP), R11
	VXORPD Y0, Y0, Y0
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2
	VXORPD Y3, Y3, Y3
	VXORPD Y4, Y4, Y4
	VXORPD Y5, Y5, Y5
	VXORPD Y6, Y6, Y6
	VXORPD Y7, Y7, Y7
	XORQ   AX, AX
	MOVQ   CX, BX
	ANDQ   $-4, BX
	JZ     reduce42

four42:
	VMOVUPD     (SI)(AX*8), Y8
	VMOVUPD     (DI)(AX*8), Y9
	VMOVUPD     (R8)(AX*8), Y10
	VMOVUPD     (R9)(AX*8), Y11
	VMOVUPD     (R10)(AX*8), Y12
	VMOVUPD     (R11)(AX*8), Y13
	VFMADD231PD Y10, Y8, Y0
	VFMADD231PD Y10, Y9, Y1
	VFMADD231PD Y11, Y8, Y2
	VFMADD231PD Y11, Y9, Y3
	VFMADD231PD Y12, Y8, Y4
	VFMADD231PD Y12, Y9, Y5
	VFMADD231PD Y13, Y8, Y6
	VFMADD231PD Y13, Y9, Y7
	ADDQ        $4, AX
	CMPQ        AX, BX
	JL          four42

reduce42:
	VEXTRACTF128 $1, Y0, X8
	VADDPD       X8, X0, X0
	VHADDPD      X0, X0, X0
	VEXTRACTF128 $1, Y1, X8
	VADDPD       X8, X1, X1
	VHADDPD      X1, X1, X1
	VEXTRACTF128 $1, Y2, X8
	VADDPD       X8, X2, X2
	VHADDPD      X2, X2, X2
	VEXTRACTF128 $1, Y3, X8
	VADDPD       X8, X3, X3
	VHADDPD      X3, X3, X3
	VEXTRACTF128 $1, Y4, X8
	VADDPD       X8, X4, X4
	VHADDPD      X4, X4, X4
	VEXTRACTF128 $1, Y5, X8
	VADDPD       X8, X5, X5
	VHADDPD      X5, X5, X5
	VEXTRACTF128 $1, Y6, X8
	VADDPD       X8, X6, X6
	VHADDPD      X6, X6, X6
	VEXTRACTF128 $1, Y7, X8
	VADDPD       X8, X7, X7
	VHADDPD      X7, X7, X7
	CMPQ         AX, CX
	JGE          done42

one42:
	VMOVSD      (SI)(AX*8), X8
	VMOVSD      (DI)(AX*8), X9
	VMOVSD      (R8)(AX*8), X10
	VMOVSD      (R9)(AX*8), X11
	VMOVSD      (R10)(AX*8), X12
	VMOVSD      (R11)(AX*8), X13
	VFMADD231SD X10, X8, X0
	VFMADD231SD X10, X9, X1
	VFMADD231SD X11, X8, X2
	VFMADD231SD X11, X9, X3
	VFMADD231SD X12, X8, X4
	VFMADD231SD X12, X9, X5
	VFMADD231SD X13, X8, X6
	VFMADD231SD X13, X9, X7
	INCQ        AX
	CMPQ        AX, CX
	JL          one42

done42:
	VZEROUPPER
	MOVQ  s+144(FP), DX
	MOVSD X0, (DX)
	MOVSD X1, 8(DX)
	MOVSD X2, 16(DX)
	MOVSD X3, 24(DX)
	MOVSD X4, 32(DX)
	MOVSD X5, 40(DX)
	MOVSD X6, 48(DX)
	MOVSD X7, 56(DX)
	RET

// func axpyFMA(alpha float64, x, y []float64)
//
// y[i] += alpha·x[i] for i < len(x), sixteen terms a step, then four, then
// one.
TEXT ·axpyFMA(SB), NOSPLIT, $0-56
	VBROADCASTSD alpha+0(FP), Y15
	MOVQ         x_base+8(FP), SI
	MOVQ         x_len+16(FP), CX
	MOVQ         y_base+32(FP), DI
	XORQ         AX, AX
	MOVQ         CX, BX
	ANDQ         $-16, BX
	JZ           axfour

ax16:
	VMOVUPD     (DI)(AX*8), Y0
	VMOVUPD     32(DI)(AX*8), Y1
	VMOVUPD     64(DI)(AX*8), Y2
	VMOVUPD     96(DI)(AX*8), Y3
	VFMADD231PD (SI)(AX*8), Y15, Y0
	VFMADD231PD 32(SI)(AX*8), Y15, Y1
	VFMADD231PD 64(SI)(AX*8), Y15, Y2
	VFMADD231PD 96(SI)(AX*8), Y15, Y3
	VMOVUPD     Y0, (DI)(AX*8)
	VMOVUPD     Y1, 32(DI)(AX*8)
	VMOVUPD     Y2, 64(DI)(AX*8)
	VMOVUPD     Y3, 96(DI)(AX*8)
	ADDQ        $16, AX
	CMPQ        AX, BX
	JL          ax16

axfour:
	MOVQ CX, BX
	ANDQ $-4, BX
	CMPQ AX, BX
	JGE  axone

ax4:
	VMOVUPD     (DI)(AX*8), Y0
	VFMADD231PD (SI)(AX*8), Y15, Y0
	VMOVUPD     Y0, (DI)(AX*8)
	ADDQ        $4, AX
	CMPQ        AX, BX
	JL          ax4

axone:
	CMPQ AX, CX
	JGE  axdone

ax1:
	VMOVSD      (DI)(AX*8), X0
	VFMADD231SD (SI)(AX*8), X15, X0
	VMOVSD      X0, (DI)(AX*8)
	INCQ        AX
	CMPQ        AX, CX
	JL          ax1

axdone:
	VZEROUPPER
	RET
