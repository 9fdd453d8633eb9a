/* hypsolev.h - the whole public API of libhypsolev. */
#ifndef HYPSOLEV_H
#define HYPSOLEV_H

#define HYPSOLEV_VERSION "0.1.0"

#include "hypsolev/error.h"
#include "hypsolev/samples.h"
#include "hypsolev/units.h"
#include "hypsolev/timeparse.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"
#include "hypsolev/readers.h"
#include "hypsolev/correct.h"
#include "hypsolev/writers.h"
#include "hypsolev/vertical.h"
#include "hypsolev/inspect.h"
#include "hypsolev/marks.h"
#include "hypsolev/survey.h"

#endif
