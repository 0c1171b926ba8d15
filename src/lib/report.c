/* report.c - CSV and JSON data written beside the charts.  Numbers are
 * printed with a fixed format in the C locale so that the same grid gives
 * the same bytes on every run and thread count. */
#include "config.h"
#include "synodic.h"
#include "synodic/io.h"
#include "synodic/lvcap.h"
#include "synodic/report.h"

#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

const char SY_CAUTION[] =
    "Preliminary two-body, patched-conic, mean-element figures; confirm with "
    "high-fidelity ephemerides and the responsible launch and mission "
    "authorities.";
const char SY_MODEL_TEXT[] =
    "Planets: Standish/JPL Keplerian mean elements; Lambert: Izzo (2015); "
    "heliocentric two-body, patched conics";

static const char *cell_status_name(unsigned char s)
{
    switch (s) {
    case SY_CELL_OK: return "ok";
    case SY_CELL_NOSOL: return "no-solution";
    case SY_CELL_DEGENERATE: return "degenerate";
    case SY_CELL_NOCONV: return "not-converged";
    case SY_CELL_NOTIME: return "flight-under-one-day";
    case SY_CELL_RANGE: return "outside-ephemeris";
    }
    return "unknown";
}

sy_status sy_report_csv(const sy_grid *g, const sy_study *st,
                        const char *path, sy_error *err)
{
    sy_outfile of;
    sy_status s = (sy_status)sy_outfile_open(&of, path, err);
    if (s != SY_OK) return s;
    FILE *f = of.fp;
    fputs("departure_tdb,departure_jd,arrival_tdb,arrival_jd,status,type,feasible", f);
    for (int k = 0; k < SY_NFIELDS; k++)
        if (g->field[k]) fprintf(f, ",%s", sy_field_key((sy_field)k));
    fputc('\n', f);
    for (size_t j = 0; j < g->ny; j++) {
        for (size_t i = 0; i < g->nx; i++) {
            size_t c = j * g->nx + i;
            double dep = sy_grid_x_jd(g, (double)i), arr = sy_grid_arr_jd(g, (double)i, (double)j);
            char d1[40], d2[40];
            sy_date_format(dep, 1, d1, sizeof d1);
            sy_date_format(arr, 1, d2, sizeof d2);
            fprintf(f, "%s,%.5f,%s,%.5f,%s,%s,%d", d1, dep, d2, arr,
                    cell_status_name(g->status[c]),
                    g->type[c] == 1 ? "I" : g->type[c] == 2 ? "II" : "",
                    sy_grid_cell_feasible(g, st, c));
            for (int k = 0; k < SY_NFIELDS; k++) {
                if (!g->field[k]) continue;
                float v = g->field[k][c];
                if (isfinite(v)) fprintf(f, ",%.7g", (double)v);
                else fputs(",", f);
            }
            fputc('\n', f);
        }
    }
    return (sy_status)sy_outfile_commit(&of, err);
}

json_t *sy_json_number(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}


static json_t *jvec(const double v[3])
{
    json_t *a = json_array();
    for (int k = 0; k < 3; k++) json_array_append_new(a, sy_json_number(v[k]));
    return a;
}

static json_t *jdate(double jd)
{
    char buf[40];
    sy_date_format(jd, 1, buf, sizeof buf);
    return json_string(buf);
}

/* Round to 0.01 day, the resolution the optima are reported to. */
static double round_day(double jd)
{
    return nearbyint(jd * 100.0) / 100.0;
}

json_t *sy_report_transfer_json(const sy_transfer *t)
{
    json_t *o = json_object();
    json_object_set_new(o, "departure_tdb", jdate(t->jd_dep));
    json_object_set_new(o, "departure_jd", json_real(round_day(t->jd_dep)));
    json_object_set_new(o, "arrival_tdb", jdate(t->jd_arr));
    json_object_set_new(o, "arrival_jd", json_real(round_day(t->jd_arr)));
    json_object_set_new(o, "tof_days", json_real(nearbyint(t->tof_days * 100) / 100));
    json_object_set_new(o, "type", json_string(t->type == 1 ? "I" : "II"));
    json_object_set_new(o, "transfer_angle_deg", sy_json_number(t->transfer_angle_deg));
    json_object_set_new(o, "c3_km2_s2", sy_json_number(t->c3_km2_s2));
    json_object_set_new(o, "vinf_dep_km_s", sy_json_number(t->vinf_dep_km_s));
    json_object_set_new(o, "dla_deg", sy_json_number(t->dla_deg));
    json_object_set_new(o, "rla_deg", sy_json_number(t->rla_deg));
    json_object_set_new(o, "vinf_arr_km_s", sy_json_number(t->vinf_arr_km_s));
    json_object_set_new(o, "c3_arr_km2_s2", sy_json_number(t->c3_arr_km2_s2));
    json_object_set_new(o, "dap_deg", sy_json_number(t->dap_deg));
    json_object_set_new(o, "rap_deg", sy_json_number(t->rap_deg));
    json_object_set_new(o, "min_sun_dist_au", sy_json_number(t->min_sun_dist_au));
    json_object_set_new(o, "v1_km_s", jvec(t->v1_km_s));
    json_object_set_new(o, "v2_km_s", jvec(t->v2_km_s));
    if (isfinite(t->dv_dep_km_s)) json_object_set_new(o, "dv_dep_km_s", json_real(t->dv_dep_km_s));
    if (isfinite(t->dv_cap_km_s)) json_object_set_new(o, "dv_cap_km_s", json_real(t->dv_cap_km_s));
    if (isfinite(t->dv_total_km_s)) json_object_set_new(o, "dv_total_km_s", json_real(t->dv_total_km_s));
    if (isfinite(t->v_entry_km_s)) json_object_set_new(o, "v_entry_km_s", json_real(t->v_entry_km_s));
    return o;
}

sy_status sy_report_json(const sy_grid *g, const sy_study *st,
                         const sy_optimum *opt, size_t nopt,
                         const char *path, sy_error *err)
{
    json_t *root = json_object();
    json_object_set_new(root, "program", json_string("synodic"));
    json_object_set_new(root, "version", json_string(sy_version()));
    json_t *jst = json_object();
    json_object_set_new(jst, "file", json_string(st->path));
    json_object_set_new(jst, "title", json_string(st->title));
    json_object_set_new(jst, "subtitle", json_string(st->subtitle));
    json_object_set_new(jst, "origin", json_string(g->spec.from->name));
    json_object_set_new(jst, "target", json_string(g->spec.to->name));
    json_object_set_new(jst, "revolutions", json_integer(st->revs));
    if (st->revs > 0)
        json_object_set_new(jst, "branch", json_string(st->branch == SY_BRANCH_LEFT ? "left" : "right"));
    json_object_set_new(root, "study", jst);

    json_t *model = json_object();
    json_object_set_new(model, "ephemeris", json_string("Standish, Keplerian Elements for Approximate Positions of the Major Planets (JPL); Table 1 1800-2050, Tables 2a/2b 3000 BC-3000 AD"));
    json_object_set_new(model, "lambert", json_string("Izzo, Revisiting Lambert's problem (2015), Householder iterations"));
    json_object_set_new(model, "dynamics", json_string("heliocentric two-body, patched conics"));
    json_object_set_new(model, "frame", json_string("ecliptic J2000 (DLA/RLA, DAP/RAP in EME2000)"));
    json_object_set_new(model, "time_scale", json_string("TDB"));
    json_object_set_new(model, "gm_sun_km3_s2", json_real(SY_GM_SUN_KM3_S2));
    json_object_set_new(model, "caution", json_string(SY_CAUTION));
    json_object_set_new(root, "model", model);

    size_t cells = g->nx * g->ny, solved = 0, feasible = 0;
    for (size_t k = 0; k < cells; k++) {
        solved += g->status[k] == SY_CELL_OK;
        feasible += (size_t)sy_grid_cell_feasible(g, st, k);
    }
    json_t *grid = json_object();
    json_object_set_new(grid, "departure_start_tdb", jdate(g->spec.x0_jd));
    json_object_set_new(grid, "departure_start_jd", json_real(g->spec.x0_jd));
    json_object_set_new(grid, "departure_step_days", json_real(g->spec.dx_days));
    json_object_set_new(grid, "departure_count", json_integer((json_int_t)g->nx));
    json_object_set_new(grid, "y_axis", json_string(g->spec.y_is_tof ? "tof" : "arrival"));
    if (g->spec.y_is_tof) {
        json_object_set_new(grid, "tof_start_days", json_real(g->spec.y0));
    } else {
        json_object_set_new(grid, "arrival_start_tdb", jdate(g->spec.y0));
        json_object_set_new(grid, "arrival_start_jd", json_real(g->spec.y0));
    }
    json_object_set_new(grid, "y_step_days", json_real(g->spec.dy_days));
    json_object_set_new(grid, "y_count", json_integer((json_int_t)g->ny));
    json_object_set_new(grid, "cells", json_integer((json_int_t)cells));
    json_object_set_new(grid, "solved_cells", json_integer((json_int_t)solved));
    json_object_set_new(grid, "feasible_cells", json_integer((json_int_t)feasible));
    json_object_set_new(root, "grid", grid);

    json_object_set_new(root, "constraints", sy_report_limits_json(st));

    json_t *orb = json_object();
    if (st->orbits.want_park) json_object_set_new(orb, "park_alt_km", json_real(st->orbits.park_alt_km));
    if (st->orbits.want_capture) {
        json_object_set_new(orb, "capture_peri_km", json_real(st->orbits.capture_peri_km));
        json_object_set_new(orb, "capture_apo_km", json_real(st->orbits.capture_apo_km));
    }
    if (st->orbits.want_entry) json_object_set_new(orb, "entry_alt_km", json_real(st->orbits.entry_alt_km));
    json_object_set_new(root, "orbits", orb);

    /* Launch vehicle: injected mass and margin at each optimum's C3. */
    sy_lvcap *cap = NULL;
    if (st->lv_capability[0]) {
        sy_status ls = sy_lvcap_load(st->lv_capability, &cap, err);
        if (ls != SY_OK) {
            json_decref(root);
            return ls;
        }
        json_t *lv = json_object();
        json_object_set_new(lv, "capability_file", json_string(st->lv_capability));
        json_object_set_new(lv, "spacecraft_mass_kg", sy_json_number(st->spacecraft_mass_kg));
        json_object_set_new(root, "launch_vehicle", lv);
    }

    json_t *arr = json_array();
    for (size_t k = 0; k < nopt; k++) {
        json_t *o;
        if (opt[k].found) {
            o = sy_report_transfer_json(&opt[k].transfer);
        } else {
            o = json_object();
            json_object_set_new(o, "note", json_string("no cell satisfies the constraints"));
        }
        json_object_set_new(o, "minimum_of", json_string(sy_field_key(opt[k].field)));
        json_object_set_new(o, "restricted_to_type",
                            opt[k].type ? json_string(opt[k].type == 1 ? "I" : "II") : json_null());
        json_object_set_new(o, "found", json_boolean(opt[k].found));
        if (opt[k].found) {
            json_object_set_new(o, "value", json_real(opt[k].value));
            /* the sides of the grid window the optimum is pressed against
             * (sy_optimum.edges): its minimum may lie beyond them */
            static const struct { unsigned bit; const char *arr, *tof; } sides[4] = {
                {SY_EDGE_DEP_FIRST, "departure_first", "departure_first"},
                {SY_EDGE_DEP_LAST, "departure_last", "departure_last"},
                {SY_EDGE_Y_FIRST, "arrival_first", "tof_first"},
                {SY_EDGE_Y_LAST, "arrival_last", "tof_last"}};
            json_t *ed = json_array();
            for (int q = 0; q < 4; q++)
                if (opt[k].edges & sides[q].bit)
                    json_array_append_new(ed, json_string(g->spec.y_is_tof ? sides[q].tof : sides[q].arr));
            json_object_set_new(o, "at_grid_edge", ed);
        }
        if (opt[k].found && cap) {
            /* null when the C3 lies outside the table (no extrapolation) */
            double m;
            (void)sy_lvcap_mass(cap, opt[k].transfer.c3_km2_s2, &m, NULL);
            json_object_set_new(o, "injected_mass_kg", sy_json_number(m));
            json_object_set_new(o, "mass_margin_kg", sy_json_number(m - st->spacecraft_mass_kg));
        }
        json_array_append_new(arr, o);
    }
    json_object_set_new(root, "optima", arr);
    sy_lvcap_free(cap);

    return sy_report_write_json(root, path, err);
}

sy_status sy_report_write_json(json_t *root, const char *path, sy_error *err)
{
    char *text = json_dumps(root, JSON_INDENT(2) | JSON_PRESERVE_ORDER | JSON_REAL_PRECISION(10));
    json_decref(root);
    if (!text) return sy_fail(err, SY_ERR_NOMEM, "out of memory writing %s", path);
    sy_outfile of;
    sy_status s = (sy_status)sy_outfile_open(&of, path, err);
    if (s == SY_OK) {
        fputs(text, of.fp);
        fputc('\n', of.fp);
        s = (sy_status)sy_outfile_commit(&of, err);
    }
    free(text);
    return s;
}

json_t *sy_report_limits_json(const sy_study *st)
{
    json_t *lim = json_object();
    json_object_set_new(lim, "c3_max_km2_s2", sy_json_number(st->c3_max_km2_s2));
    json_object_set_new(lim, "vinf_arr_max_km_s", sy_json_number(st->vinf_arr_max_km_s));
    json_object_set_new(lim, "dla_max_deg", sy_json_number(st->dla_max_deg));
    json_object_set_new(lim, "tof_min_days", sy_json_number(st->tof_min_days));
    json_object_set_new(lim, "tof_max_days", sy_json_number(st->tof_max_days));
    return lim;
}
