/* hypsolev.h - the whole public API of libhypsolev.
 *
 * Start with survey.h: a survey run does what the program's `correct`
 * does. The other headers are its parts, for clients that want them:
 * readers (readers.h, marks.h), the correction (correct.h), writers
 * (writers.h), kernels (atmosphere.h, geo.h, vertical.h, units.h,
 * timeparse.h) and log checks (inspect.h).
 *
 * Threads. The library has no writable global state; every object is the
 * caller's, and one object is used by one thread at a time unless said
 * otherwise. What may run concurrently:
 * - any calls on different objects (a hyp_geo holds its own PROJ
 *   context, so give each thread its own; never share one);
 * - hyp_survey_run on one hyp_survey from several threads (the survey
 *   is only read once its bases are added; hyp_survey_run_many does this);
 * - hyp_correct_point and the writers on one finished result (they only
 *   read it);
 * - LAPACK: the library calls it from several threads at once (reference
 *   LAPACK keeps no state between calls since 3.1).
 * What must come first, once per process, before threads start:
 * libxml2's xmlInitParser() (hyp_survey_run_many calls it; a client
 * starting its own threads around the readers calls it itself).
 * hyp_survey_new, hyp_survey_add_base and hyp_survey_add_base_dir must not
 * run while a rover of the same survey runs. The library never installs
 * signal handlers: a client stops a run through hyp_survey_opts.cancelled. */
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
#include "hypsolev/network.h"
#include "hypsolev/settings.h"

#endif
