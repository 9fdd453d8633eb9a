/* fmtnum.h - fixed-point number formatting for the writers' hot paths
 * (private). */
#ifndef HYP_FMTNUM_H
#define HYP_FMTNUM_H

#include <stddef.h>

/* v with prec decimals (0..9) into buf (n >= 32), exactly as
 * printf("%.*f", prec, v) prints it, in integer arithmetic where that is
 * provably the same: |v| 10^prec below 2^35 and not within 4e-6 of a half
 * (where the exact binary value decides, as printf rounds it); otherwise
 * printf itself. Returns the length. */
int hyp__fmt_fixed(char *buf, size_t n, double v, int prec);

#endif
