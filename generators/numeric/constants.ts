/**
 * Constants shared by the fdlibm ports of this folder (Sun Microsystems, 1993; hex patterns as in
 * fdlibm). ln 2 is split so that k·LN2_HI is exact for the integers k the reductions use.
 */
export const LN2_HI = 6.93147180369123816490e-1; // 0x3fe62e42 0xfee00000
export const LN2_LO = 1.90821492927058770002e-10; // 0x3dea39ef 0x35793c76: ln 2 − LN2_HI
export const INV_LN2 = 1.44269504088896338700; // 0x3ff71547 0x652b82fe
/** Remez polynomial of log(1+f) = f − s·(f − R(s²)), s = f/(2+f) (e_log.c's Lg1…Lg7, s_log1p.c's Lp1…Lp7). */
export const LG1 = 6.666666666666735130e-1; // 0x3fe55555 0x55555593
export const LG2 = 3.999999999940941908e-1; // 0x3fd99999 0x9997fa04
export const LG3 = 2.857142874366239149e-1; // 0x3fd24924 0x94229359
export const LG4 = 2.222219843214978396e-1; // 0x3fcc71c5 0x1d8e78af
export const LG5 = 1.818357216161805012e-1; // 0x3fc74664 0x96cb03de
export const LG6 = 1.531383769920937332e-1; // 0x3fc39a09 0xd078c69f
export const LG7 = 1.479819860511658591e-1; // 0x3fc2f112 0xdf3e5244
/** Remez polynomial of exp's reduced argument (e_exp.c's and e_pow.c's P1…P5). */
export const P1 = 1.66666666666666019037e-1; // 0x3fc55555 0x5555553e
export const P2 = -2.77777777770155933842e-3; // 0xbf66c16c 0x16bebd93
export const P3 = 6.61375632143793436117e-5; // 0x3f11566a 0xaf25de2c
export const P4 = -1.65339022054652515390e-6; // 0xbebbbd41 0xc5d26bf1
export const P5 = 4.13813679705723846039e-8; // 0x3e663769 0x72bea4d0
