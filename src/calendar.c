/* calendar.c - days from a civil (proleptic Gregorian) date, for the time
 * parser and the tz rules alike. */
#include "hypsolev/timeparse.h"

/* H. Hinnant, "chrono-Compatible Low-Level Date Algorithms" (public domain). */
int64_t hyp_days_from_civil(int64_t y, unsigned m, unsigned d)
{
    y -= m <= 2;
    const int64_t era = (y >= 0 ? y : y - 399) / 400;
    const unsigned yoe = (unsigned)(y - era * 400);
    const unsigned doy = (153 * (m > 2 ? m - 3 : m + 9) + 2) / 5 + d - 1;
    const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + (int64_t)doe - 719468;
}
