/* synodic/report.h - data files written beside the charts (libsynodic). */
#ifndef SYNODIC_REPORT_H
#define SYNODIC_REPORT_H

#include <jansson.h>

#include "synodic.h"
#include "synodic/grid.h"
#include "synodic/study.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The caution every report carries. */
extern const char SY_CAUTION[];
/* One-line model description: ephemeris and solver. */
extern const char SY_MODEL_TEXT[];

/* Long-form CSV: one row per cell, every stored field, dates as ISO (TDB)
 * and JD.  Deterministic.  Written through a temporary file. */
sy_status sy_report_csv(const sy_grid *g, const sy_study *st,
                        const char *path, sy_error *err);
/* JSON summary: study, model, grid, constraints, optima with every
 * figure, program version.  Deterministic. */
sy_status sy_report_json(const sy_grid *g, const sy_study *st,
                         const sy_optimum *opt, size_t nopt,
                         const char *path, sy_error *err);

/* JSON helpers shared by every report writer. */
json_t *sy_json_number(double v);          /* null when not finite   */
json_t *sy_report_transfer_json(const sy_transfer *t);
/* The study's limits, null where a limit is absent. */
json_t *sy_report_limits_json(const sy_study *st);
/* Write `root` (stolen) indented, key order kept, 10 significant digits,
 * through a temporary file renamed into place. */
sy_status sy_report_write_json(json_t *root, const char *path, sy_error *err);

#ifdef __cplusplus
}
#endif
#endif
