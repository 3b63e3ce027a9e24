/*
 * portwright firmware allocation tables (tables format 1)
 *
 * Layout:       Heron 54 (demo)
 * Flight state: liftoff
 * Ports:        8 (bit i of a valve mask is port i)
 * Map axes:     roll, pitch and yaw (the duty-cycle map follows all three).
 *
 * Frame: body axes with +x toward the nose, +y through the reference line
 *   on the tube and +z = x cross y. Roll is rotation about +x, pitch about +y,
 *   yaw about +z, each right-handed. Torques are about the CG of the flight
 *   state above; a vector [3] is always (roll, pitch, yaw) or (x, y, z).
 * Units: torque N.m, force N, gas rate kg/s, duty cycle 0..1 per port,
 *   region map entries 1/(N.m).
 * Numbers: pw_real is double, or float when PW_USE_FLOAT is defined before
 *   this header is included. The values are written so that double reads
 *   back exactly what portwright computed. Do not build with -ffast-math:
 *   pw_duty_cycles() rejects NaN and infinite commands by IEEE rules.
 *
 * Tables
 *   pw_ports[i]    name, torque at full duty and gas flow of port i.
 *   pw_onoff[row]  least-gas on/off valve set for the per-axis command
 *                  (roll, pitch, yaw), each -1, 0 or 1, with
 *                  row = (roll+1)*9 + (pitch+1)*3 + (yaw+1); row 13 is the
 *                  command (0,0,0), all valves shut. Use pw_onoff_mask().
 *                  outcome PW_ONOFF_NEAR_MISS marks a row where no valve set
 *                  met the thresholds; shortfall says by how much.
 *                  The rule the rows were chosen by (PW_ONOFF_FRACTION,
 *                  PW_ONOFF_TOLERANCE, PW_ONOFF_COMPARISON_TOLERANCE,
 *                  pw_onoff_best_positive_nm and _negative_nm below):
 *                    a row's valve set pushes each commanded axis the commanded
 *                    way by at least (fraction - comparison_tolerance) * best
 *                    torque of that axis and sense (and more than
 *                    noise_floor_nm), and keeps each uncommanded axis within
 *                    (tolerance + comparison_tolerance) * scale, scale =
 *                    max(best positive, best negative) of that axis; torques
 *                    include supply droop with k valves open; of the sets that
 *                    qualify the least gas wins, gas rates within
 *                    comparison_tolerance (relative) count as equal, then fewer
 *                    valves, then the smaller mask; near_miss rows hold the set
 *                    with the least shortfall
 *                  Here: fraction 5e-1, tolerance 1e-1, comparison tolerance 1e-9.
 *   pw_regions[r]  exact minimum-gas duty cycles, piecewise affine in the
 *                  torque command tau: in region r the duty of port basic[k]
 *                  is sum_j map[k][j]*tau[j] + offset[k] for k = 0 to
 *                  PW_BASIC_COUNT - 1 (one basic port per mapped axis), ports
 *                  in full_on run at 1, all others at 0. tau is in region r
 *                  when its inequalities hold: -map*tau <= offset and
 *                  map*tau <= 1 - offset, i.e. the basic duties lie in [0, 1].
 *   pw_facets[f]   the attainable torque set: normal . tau <= offset_nm for
 *                  every f. A command outside it is scaled to the boundary by
 *                  s = min over f with normal . tau > 0 of offset_nm / (normal . tau).
 *
 * Functions
 *   pw_onoff_row(), pw_onoff_mask()  on/off look-up by command signs.
 *   pw_duty_cycles()  exact minimum-gas duty cycles for a torque command.
 *   pw_torque_for_duty()  torque the ports give for given duty cycles.
 */
#ifndef PORTWRIGHT_TABLES_H
#define PORTWRIGHT_TABLES_H

#include <stdint.h>

#ifdef PW_USE_FLOAT
typedef float pw_real;
#define PW_R(x) ((float)(x)) /* double literal rounded once, at compile time */
#else
typedef double pw_real;
#define PW_R(x) x
#endif

/* Slack of the region test (duty units) and of the envelope test (N.m).
 * Define them before including this header to override. */
#ifndef PW_REGION_SLACK
#ifdef PW_USE_FLOAT
#define PW_REGION_SLACK PW_R(1e-5)
#else
#define PW_REGION_SLACK PW_R(1e-9)
#endif
#endif
#ifndef PW_ENVELOPE_SLACK_NM
#ifdef PW_USE_FLOAT
#define PW_ENVELOPE_SLACK_NM PW_R(4.5013123933599723e-7)
#else
#define PW_ENVELOPE_SLACK_NM PW_R(4.5013123933599727e-10)
#endif
#endif

#define PW_PORT_COUNT 8
typedef uint32_t pw_mask; /* valve masks: bit i = port i */
#define PW_BASIC_COUNT 3 /* basic ports per region = axes the map follows */
#define PW_MAP_ROLL 1 /* 1 when the map follows roll */
#define PW_MAP_PITCH 1 /* 1 when the map follows pitch */
#define PW_MAP_YAW 1 /* 1 when the map follows yaw */
#define PW_ONOFF_ROWS 27
#define PW_ONOFF_ALL_OFF_ROW 13
#define PW_REGION_COUNT 36
#define PW_FACET_COUNT 14
#define PW_GRID_POINTS_PER_AXIS 0
#define PW_GRID_COUNT 0

/* The rule the on/off rows were chosen by (see the comment at the top). */
#define PW_ONOFF_FRACTION PW_R(5e-1)
#define PW_ONOFF_TOLERANCE PW_R(1e-1)
#define PW_ONOFF_COMPARISON_TOLERANCE PW_R(1e-9)
#define PW_ONOFF_NOISE_FLOOR_NM PW_R(4.567513935879612e-10)
static const pw_real pw_onoff_best_positive_nm[3] = {PW_R(4.488737355465715e-2), PW_R(4.5013123933599725e-1), PW_R(4.567513935879612e-1)}; /* roll, pitch, yaw */
static const pw_real pw_onoff_best_negative_nm[3] = {PW_R(4.488737355465715e-2), PW_R(4.5013123933599725e-1), PW_R(4.567513935879612e-1)}; /* magnitudes */

/* pw_onoff[row].outcome */
#define PW_ONOFF_ALL_OFF 0
#define PW_ONOFF_MEETS 1
#define PW_ONOFF_NEAR_MISS 2

/* Return values of pw_duty_cycles() */
#define PW_EXACT 0       /* the duty cycles give the command */
#define PW_SCALED 1      /* out of reach: they give scale * command */
#define PW_BAD_COMMAND (-1) /* NaN or infinite command: all duties 0 */

typedef struct {
    const char *name;
    pw_real torque_nm[3];   /* at full duty, about the CG */
    pw_real mass_flow_kg_s; /* at full duty */
} pw_port;

typedef struct {
    signed char command[3]; /* roll, pitch, yaw: -1, 0 or 1 */
    pw_mask mask;           /* open valves, bit i = port i */
    pw_real torque_nm[3];
    pw_real side_force_n[2]; /* y, z */
    pw_real gas_rate_kg_s;
    unsigned char outcome;  /* PW_ONOFF_ALL_OFF, _MEETS or _NEAR_MISS */
    pw_real shortfall;      /* 0 unless outcome is PW_ONOFF_NEAR_MISS */
} pw_onoff_entry;

typedef struct {
    unsigned char basic[3]; /* the PW_BASIC_COUNT fractional ports; the rest 0 */
    pw_mask full_on;        /* ports held at duty 1 */
    pw_real map[3][3];      /* 1/(N.m) */
    pw_real offset[3];      /* duty */
} pw_region;

typedef struct {
    pw_real normal[3]; /* outward unit normal */
    pw_real offset_nm; /* normal . tau <= offset_nm inside */
} pw_facet;

static const pw_port pw_ports[PW_PORT_COUNT] = {
    {"yaw-neg", {PW_R(0e0), PW_R(0e0), PW_R(-4.5013123933599725e-1)}, PW_R(2.445201800536876e-3)}, /* 0 */
    {"pitch-pos", {PW_R(0e0), PW_R(4.5013123933599725e-1), PW_R(-2.756258907245301e-17)}, PW_R(2.445201800536876e-3)}, /* 1 */
    {"yaw-pos", {PW_R(0e0), PW_R(5.512517814490602e-17), PW_R(4.5013123933599725e-1)}, PW_R(2.445201800536876e-3)}, /* 2 */
    {"pitch-neg", {PW_R(-7.703719777548943e-34), PW_R(-4.5013123933599725e-1), PW_R(8.268776721735903e-17)}, PW_R(2.445201800536876e-3)}, /* 3 */
    {"roll-pos-a", {PW_R(2.2712323315045455e-2), PW_R(2.8427656569468955e-3), PW_R(1.060934586573773e-2)}, PW_R(1.9635808772388136e-3)}, /* 4 */
    {"roll-pos-b", {PW_R(2.271232331504546e-2), PW_R(-2.8427656569468955e-3), PW_R(-1.0609345865737732e-2)}, PW_R(1.9635808772388136e-3)}, /* 5 */
    {"roll-neg-a", {PW_R(-2.2712323315045458e-2), PW_R(2.8427656569468937e-3), PW_R(-1.0609345865737732e-2)}, PW_R(1.9635808772388136e-3)}, /* 6 */
    {"roll-neg-b", {PW_R(-2.2712323315045458e-2), PW_R(-2.8427656569468924e-3), PW_R(1.0609345865737732e-2)}, PW_R(1.9635808772388136e-3)}, /* 7 */
};

static const pw_onoff_entry pw_onoff[PW_ONOFF_ROWS] = {
    /* 0: command (-1, -1, -1), meets */
    {{-1, -1, -1}, UINT32_C(0x000000C9), {PW_R(-4.28521990640943e-2), PW_R(-4.246398134931407e-1), PW_R(-4.2463981349314067e-1)}, {PW_R(-1.0924834626257047e0), PW_R(1.0924834626257052e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 1: command (-1, -1, 0), meets */
    {{-1, -1, 0}, UINT32_C(0x00000048), {PW_R(-2.2443686777328574e-2), PW_R(-4.4199804058407e-1), PW_R(-1.0483860775494824e-2)}, {PW_R(9.271362916158034e-1), PW_R(1.3927940728676182e0)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 2: command (-1, -1, 1), meets */
    {{-1, -1, 1}, UINT32_C(0x000000CC), {PW_R(-4.28521990640943e-2), PW_R(-4.2463981349314067e-1), PW_R(4.246398134931408e-1)}, {PW_R(1.0924834626257052e0), PW_R(1.0924834626257047e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 3: command (-1, 0, -1), meets */
    {{-1, 0, -1}, UINT32_C(0x00000041), {PW_R(-2.2443686777328574e-2), PW_R(2.809142028354182e-3), PW_R(-4.5529104338791915e-1)}, {PW_R(-2.1723236063977489e-1), PW_R(2.4842542061204015e-1)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 4: command (-1, 0, 0), meets */
    {{-1, 0, 0}, UINT32_C(0x00000040), {PW_R(-2.2712323315045458e-2), PW_R(2.8427656569468937e-3), PW_R(-1.0609345865737732e-2)}, {PW_R(9.382335184592525e-1), PW_R(2.513989135829674e-1)}, PW_R(1.9635808772388136e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 5: command (-1, 0, 1), meets */
    {{-1, 0, 1}, UINT32_C(0x00000044), {PW_R(-2.2443686777328574e-2), PW_R(2.809142028354236e-3), PW_R(4.343233218369293e-1)}, {PW_R(2.0715049438713815e0), PW_R(2.4842542061203998e-1)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 6: command (-1, 1, -1), meets */
    {{-1, 1, -1}, UINT32_C(0x000000C3), {PW_R(-4.28521990640943e-2), PW_R(4.246398134931407e-1), PW_R(-4.246398134931407e-1)}, {PW_R(-1.092483462625705e0), PW_R(-1.092483462625705e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 7: command (-1, 1, 0), meets */
    {{-1, 1, 0}, UINT32_C(0x00000042), {PW_R(-2.2443686777328574e-2), PW_R(4.476163246407784e-1), PW_R(-1.0483860775494933e-2)}, {PW_R(9.27136291615803e-1), PW_R(-8.959432316435378e-1)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 8: command (-1, 1, 1), meets */
    {{-1, 1, 1}, UINT32_C(0x000000C6), {PW_R(-4.28521990640943e-2), PW_R(4.246398134931408e-1), PW_R(4.246398134931407e-1)}, {PW_R(1.0924834626257052e0), PW_R(-1.092483462625705e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 9: command (0, -1, -1), meets */
    {{0, -1, -1}, UINT32_C(0x00000009), {PW_R(-7.6126018157325525e-34), PW_R(-4.448071826124242e-1), PW_R(-4.4480718261242413e-1)}, {PW_R(-1.1443686522555778e0), PW_R(1.144368652255578e0)}, PW_R(4.832560945647992e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 10: command (0, -1, 0), meets */
    {{0, -1, 0}, UINT32_C(0x00000008), {PW_R(-7.703719777548943e-34), PW_R(-4.5013123933599725e-1), PW_R(8.268776721735903e-17)}, {PW_R(2.1273327506269695e-16), PW_R(1.1580660111460173e0)}, PW_R(2.445201800536876e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 11: command (0, -1, 1), meets */
    {{0, -1, 1}, UINT32_C(0x0000000C), {PW_R(-7.6126018157325525e-34), PW_R(-4.4480718261242413e-1), PW_R(4.4480718261242425e-1)}, {PW_R(1.1443686522555783e0), PW_R(1.1443686522555778e0)}, PW_R(4.832560945647992e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 12: command (0, 0, -1), meets */
    {{0, 0, -1}, UINT32_C(0x00000001), {PW_R(0e0), PW_R(0e0), PW_R(-4.5013123933599725e-1)}, {PW_R(-1.1580660111460173e0), PW_R(0e0)}, PW_R(2.445201800536876e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 13: command (0, 0, 0), all_off */
    {{0, 0, 0}, UINT32_C(0x00000000), {PW_R(0e0), PW_R(0e0), PW_R(0e0)}, {PW_R(0e0), PW_R(0e0)}, PW_R(0e0), PW_ONOFF_ALL_OFF, PW_R(0e0)},
    /* 14: command (0, 0, 1), meets */
    {{0, 0, 1}, UINT32_C(0x00000004), {PW_R(0e0), PW_R(5.512517814490602e-17), PW_R(4.5013123933599725e-1)}, {PW_R(1.1580660111460173e0), PW_R(-1.418221833751313e-16)}, PW_R(2.445201800536876e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 15: command (0, 1, -1), meets */
    {{0, 1, -1}, UINT32_C(0x00000003), {PW_R(0e0), PW_R(4.448071826124242e-1), PW_R(-4.448071826124242e-1)}, {PW_R(-1.144368652255578e0), PW_R(-1.144368652255578e0)}, PW_R(4.832560945647992e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 16: command (0, 1, 0), meets */
    {{0, 1, 0}, UINT32_C(0x00000002), {PW_R(0e0), PW_R(4.5013123933599725e-1), PW_R(-2.756258907245301e-17)}, {PW_R(-7.091109168756565e-17), PW_R(-1.1580660111460173e0)}, PW_R(2.445201800536876e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 17: command (0, 1, 1), meets */
    {{0, 1, 1}, UINT32_C(0x00000006), {PW_R(0e0), PW_R(4.4480718261242425e-1), PW_R(4.448071826124242e-1)}, {PW_R(1.144368652255578e0), PW_R(-1.1443686522555783e0)}, PW_R(4.832560945647992e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 18: command (1, -1, -1), meets */
    {{1, -1, -1}, UINT32_C(0x00000039), {PW_R(4.28521990640943e-2), PW_R(-4.246398134931407e-1), PW_R(-4.2463981349314067e-1)}, {PW_R(-1.0924834626257047e0), PW_R(1.092483462625705e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 19: command (1, -1, 0), meets */
    {{1, -1, 0}, UINT32_C(0x00000018), {PW_R(2.244368677732857e-2), PW_R(-4.4199804058407e-1), PW_R(1.0483860775494987e-2)}, {PW_R(-9.271362916158028e-1), PW_R(1.3927940728676182e0)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 20: command (1, -1, 1), meets */
    {{1, -1, 1}, UINT32_C(0x0000003C), {PW_R(4.28521990640943e-2), PW_R(-4.2463981349314067e-1), PW_R(4.246398134931408e-1)}, {PW_R(1.0924834626257054e0), PW_R(1.0924834626257047e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 21: command (1, 0, -1), meets */
    {{1, 0, -1}, UINT32_C(0x00000011), {PW_R(2.244368677732857e-2), PW_R(2.8091420283541837e-3), PW_R(-4.343233218369293e-1)}, {PW_R(-2.071504943871381e0), PW_R(2.4842542061204032e-1)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 22: command (1, 0, 0), meets */
    {{1, 0, 0}, UINT32_C(0x00000010), {PW_R(2.2712323315045455e-2), PW_R(2.8427656569468955e-3), PW_R(1.060934586573773e-2)}, {PW_R(-9.382335184592524e-1), PW_R(2.5139891358296756e-1)}, PW_R(1.9635808772388136e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 23: command (1, 0, 1), meets */
    {{1, 0, 1}, UINT32_C(0x00000014), {PW_R(2.244368677732857e-2), PW_R(2.809142028354238e-3), PW_R(4.5529104338791915e-1)}, {PW_R(2.17232360639775e-1), PW_R(2.4842542061204015e-1)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 24: command (1, 1, -1), meets */
    {{1, 1, -1}, UINT32_C(0x00000033), {PW_R(4.28521990640943e-2), PW_R(4.246398134931407e-1), PW_R(-4.246398134931407e-1)}, {PW_R(-1.0924834626257047e0), PW_R(-1.092483462625705e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 25: command (1, 1, 0), meets */
    {{1, 1, 0}, UINT32_C(0x00000012), {PW_R(2.244368677732857e-2), PW_R(4.476163246407784e-1), PW_R(1.0483860775494878e-2)}, {PW_R(-9.271362916158031e-1), PW_R(-8.959432316435377e-1)}, PW_R(4.356636532369276e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 26: command (1, 1, 1), meets */
    {{1, 1, 1}, UINT32_C(0x00000036), {PW_R(4.28521990640943e-2), PW_R(4.246398134931408e-1), PW_R(4.246398134931407e-1)}, {PW_R(1.092483462625705e0), PW_R(-1.0924834626257052e0)}, PW_R(8.31821695727725e-3), PW_ONOFF_MEETS, PW_R(0e0)},
};

static const pw_region pw_regions[PW_REGION_COUNT] = {
    /* 0: basic ports 0 1 4 */
    {{0, 1, 4}, UINT32_C(0x00000020),
     {{PW_R(1.0377384098796945e0), PW_R(-1.3603219373908245e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(-2.7806116888202154e-1), PW_R(2.2215743156931995e0), PW_R(0e0)},
      {PW_R(4.402896111194244e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(-4.713890056325756e-2), PW_R(1.263083033801586e-2), PW_R(-1.0000000000000002e0)}},
    /* 1: basic ports 0 1 5 */
    {{0, 1, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.0377384098796942e0), PW_R(-1.3603219373908242e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(2.780611688820214e-1), PW_R(2.2215743156931995e0), PW_R(0e0)},
      {PW_R(4.402896111194243e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 2: basic ports 0 1 6 */
    {{0, 1, 6}, UINT32_C(0x00000000),
     {{PW_R(1.0377384098796945e0), PW_R(-1.3603219373908242e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(2.780611688820213e-1), PW_R(2.2215743156931995e0), PW_R(0e0)},
      {PW_R(-4.4028961111942436e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(0e0)}},
    /* 3: basic ports 0 1 7 */
    {{0, 1, 7}, UINT32_C(0x00000040),
     {{PW_R(-1.0377384098796945e0), PW_R(-1.3603219373908242e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(-2.7806116888202115e-1), PW_R(2.2215743156931995e0), PW_R(-0e0)},
      {PW_R(-4.4028961111942436e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-4.713890056325756e-2), PW_R(-1.2630830338015847e-2), PW_R(-1e0)}},
    /* 4: basic ports 0 3 4 */
    {{0, 3, 4}, UINT32_C(0x00000020),
     {{PW_R(1.0377384098796945e0), PW_R(-4.080965812172473e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(2.7806116888202154e-1), PW_R(-2.2215743156931995e0), PW_R(-0e0)},
      {PW_R(4.402896111194244e1), PW_R(-7.535286353449928e-32), PW_R(-0e0)}},
     {PW_R(-4.713890056325756e-2), PW_R(-1.263083033801586e-2), PW_R(-1.0000000000000002e0)}},
    /* 5: basic ports 0 3 5 */
    {{0, 3, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.0377384098796942e0), PW_R(-4.0809658121724727e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(-2.780611688820214e-1), PW_R(-2.2215743156931995e0), PW_R(-0e0)},
      {PW_R(4.402896111194243e1), PW_R(-7.535286353449925e-32), PW_R(-0e0)}},
     {PW_R(0e0), PW_R(0e0), PW_R(-0e0)}},
    /* 6: basic ports 0 3 6 */
    {{0, 3, 6}, UINT32_C(0x00000000),
     {{PW_R(1.0377384098796945e0), PW_R(-4.0809658121724727e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(-2.780611688820213e-1), PW_R(-2.2215743156931995e0), PW_R(-0e0)},
      {PW_R(-4.4028961111942436e1), PW_R(7.535286353449927e-32), PW_R(0e0)}},
     {PW_R(-0e0), PW_R(0e0), PW_R(-0e0)}},
    /* 7: basic ports 0 3 7 */
    {{0, 3, 7}, UINT32_C(0x00000040),
     {{PW_R(-1.0377384098796945e0), PW_R(-4.0809658121724727e-16), PW_R(-2.2215743156931995e0)},
      {PW_R(2.7806116888202115e-1), PW_R(-2.2215743156931995e0), PW_R(0e0)},
      {PW_R(-4.4028961111942436e1), PW_R(7.535286353449927e-32), PW_R(0e0)}},
     {PW_R(-4.713890056325756e-2), PW_R(1.2630830338015847e-2), PW_R(-1e0)}},
    /* 8: basic ports 0 4 5 */
    {{0, 4, 5}, UINT32_C(0x00000002),
     {{PW_R(-5.828925746301696e-17), PW_R(8.291028218957083e0), PW_R(-2.2215743156932e0)},
      {PW_R(2.2014480555971218e1), PW_R(1.758850571372793e2), PW_R(0e0)},
      {PW_R(2.2014480555971218e1), PW_R(-1.7588505713727923e2), PW_R(0e0)}},
     {PW_R(-3.7320508075688776e0), PW_R(-7.917135874988621e1), PW_R(7.91713587498862e1)}},
    /* 9: basic ports 0 4 6 */
    {{0, 4, 6}, UINT32_C(0x00000002),
     {{PW_R(1.0377384098796942e0), PW_R(-0e0), PW_R(-2.2215743156932e0)},
      {PW_R(2.201448055597121e1), PW_R(1.7588505713727932e2), PW_R(0e0)},
      {PW_R(-2.2014480555971225e1), PW_R(1.758850571372793e2), PW_R(-0e0)}},
     {PW_R(-6.123233995736766e-17), PW_R(-7.917135874988622e1), PW_R(-7.917135874988621e1)}},
    /* 10: basic ports 0 5 7 */
    {{0, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(-1.0377384098796942e0), PW_R(-4.66314059704136e-16), PW_R(-2.2215743156932e0)},
      {PW_R(2.2014480555971204e1), PW_R(-1.7588505713727938e2), PW_R(0e0)},
      {PW_R(-2.2014480555971232e1), PW_R(-1.758850571372794e2), PW_R(-0e0)}},
     {PW_R(-2.6205505742319943e-17), PW_R(-7.917135874988625e1), PW_R(-7.917135874988627e1)}},
    /* 11: basic ports 0 6 7 */
    {{0, 6, 7}, UINT32_C(0x00000008),
     {{PW_R(-2.331570298520681e-16), PW_R(-8.291028218957091e0), PW_R(-2.2215743156931995e0)},
      {PW_R(-2.2014480555971215e1), PW_R(1.7588505713727943e2), PW_R(-0e0)},
      {PW_R(-2.2014480555971225e1), PW_R(-1.7588505713727943e2), PW_R(-0e0)}},
     {PW_R(-3.7320508075688816e0), PW_R(7.917135874988628e1), PW_R(-7.917135874988628e1)}},
    /* 12: basic ports 1 2 4 */
    {{1, 2, 4}, UINT32_C(0x00000000),
     {{PW_R(-2.780611688820214e-1), PW_R(2.2215743156931995e0), PW_R(-2.720643874781649e-16)},
      {PW_R(-1.0377384098796945e0), PW_R(1.3603219373908245e-16), PW_R(2.2215743156931995e0)},
      {PW_R(4.402896111194244e1), PW_R(-0e0), PW_R(0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 13: basic ports 1 2 5 */
    {{1, 2, 5}, UINT32_C(0x00000010),
     {{PW_R(2.780611688820213e-1), PW_R(2.2215743156931995e0), PW_R(-2.7206438747816485e-16)},
      {PW_R(1.0377384098796942e0), PW_R(1.3603219373908242e-16), PW_R(2.2215743156931995e0)},
      {PW_R(4.402896111194243e1), PW_R(-0e0), PW_R(0e0)}},
     {PW_R(-1.2630830338015849e-2), PW_R(-4.713890056325755e-2), PW_R(-9.999999999999997e-1)}},
    /* 14: basic ports 1 2 6 */
    {{1, 2, 6}, UINT32_C(0x00000080),
     {{PW_R(2.780611688820214e-1), PW_R(2.2215743156931995e0), PW_R(-2.7206438747816485e-16)},
      {PW_R(-1.0377384098796945e0), PW_R(1.3603219373908242e-16), PW_R(2.2215743156931995e0)},
      {PW_R(-4.4028961111942436e1), PW_R(0e0), PW_R(-0e0)}},
     {PW_R(1.2630830338015852e-2), PW_R(-4.713890056325756e-2), PW_R(-1e0)}},
    /* 15: basic ports 1 2 7 */
    {{1, 2, 7}, UINT32_C(0x00000000),
     {{PW_R(-2.780611688820213e-1), PW_R(2.2215743156931995e0), PW_R(-2.7206438747816485e-16)},
      {PW_R(1.0377384098796945e0), PW_R(1.3603219373908242e-16), PW_R(2.2215743156931995e0)},
      {PW_R(-4.4028961111942436e1), PW_R(0e0), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 16: basic ports 1 4 5 */
    {{1, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.5618559464625186e-17), PW_R(2.2215743156931995e0), PW_R(-5.952690438157169e-1)},
      {PW_R(2.2014480555971218e1), PW_R(2.885773577950454e-15), PW_R(4.712825902063586e1)},
      {PW_R(2.2014480555971215e1), PW_R(-2.885773577950453e-15), PW_R(-4.7128259020635845e1)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 17: basic ports 1 4 7 */
    {{1, 4, 7}, UINT32_C(0x00000004),
     {{PW_R(-2.780611688820213e-1), PW_R(2.2215743156931995e0), PW_R(-3.1237118929250375e-16)},
      {PW_R(2.201448055597122e1), PW_R(2.885773577950454e-15), PW_R(4.712825902063586e1)},
      {PW_R(-2.2014480555971218e1), PW_R(2.8857735779504535e-15), PW_R(4.7128259020635845e1)}},
     {PW_R(1.8143350654358813e-17), PW_R(-2.1213901640706712e1), PW_R(-2.1213901640706705e1)}},
    /* 18: basic ports 1 5 6 */
    {{1, 5, 6}, UINT32_C(0x00000001),
     {{PW_R(2.7806116888202137e-1), PW_R(2.2215743156932e0), PW_R(-1.2494847571700149e-16)},
      {PW_R(2.2014480555971218e1), PW_R(-2.8857735779504535e-15), PW_R(-4.712825902063585e1)},
      {PW_R(-2.2014480555971218e1), PW_R(-2.885773577950454e-15), PW_R(-4.712825902063586e1)}},
     {PW_R(-5.624321222763764e-17), PW_R(-2.121390164070671e1), PW_R(-2.1213901640706712e1)}},
    /* 19: basic ports 1 6 7 */
    {{1, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(6.247423785850074e-17), PW_R(2.2215743156931995e0), PW_R(5.952690438157163e-1)},
      {PW_R(-2.2014480555971218e1), PW_R(-2.8857735779504535e-15), PW_R(-4.712825902063585e1)},
      {PW_R(-2.2014480555971218e1), PW_R(2.8857735779504535e-15), PW_R(4.712825902063585e1)}},
     {PW_R(-0e0), PW_R(0e0), PW_R(-0e0)}},
    /* 20: basic ports 2 3 4 */
    {{2, 3, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.0377384098796945e0), PW_R(4.080965812172473e-16), PW_R(2.2215743156931995e0)},
      {PW_R(2.780611688820214e-1), PW_R(-2.2215743156931995e0), PW_R(2.720643874781649e-16)},
      {PW_R(4.402896111194244e1), PW_R(-7.535286353449928e-32), PW_R(9.228064313411186e-48)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 21: basic ports 2 3 5 */
    {{2, 3, 5}, UINT32_C(0x00000010),
     {{PW_R(1.0377384098796942e0), PW_R(4.0809658121724727e-16), PW_R(2.2215743156931995e0)},
      {PW_R(-2.780611688820213e-1), PW_R(-2.2215743156931995e0), PW_R(2.7206438747816485e-16)},
      {PW_R(4.402896111194243e1), PW_R(-7.535286353449925e-32), PW_R(9.228064313411182e-48)}},
     {PW_R(-4.713890056325755e-2), PW_R(1.2630830338015849e-2), PW_R(-9.999999999999997e-1)}},
    /* 22: basic ports 2 3 6 */
    {{2, 3, 6}, UINT32_C(0x00000080),
     {{PW_R(-1.0377384098796945e0), PW_R(4.0809658121724727e-16), PW_R(2.2215743156931995e0)},
      {PW_R(-2.780611688820214e-1), PW_R(-2.2215743156931995e0), PW_R(2.7206438747816485e-16)},
      {PW_R(-4.4028961111942436e1), PW_R(7.535286353449927e-32), PW_R(-9.228064313411183e-48)}},
     {PW_R(-4.713890056325756e-2), PW_R(-1.2630830338015852e-2), PW_R(-1e0)}},
    /* 23: basic ports 2 3 7 */
    {{2, 3, 7}, UINT32_C(0x00000000),
     {{PW_R(1.0377384098796945e0), PW_R(4.0809658121724727e-16), PW_R(2.2215743156931995e0)},
      {PW_R(2.780611688820213e-1), PW_R(-2.2215743156931995e0), PW_R(2.7206438747816485e-16)},
      {PW_R(-4.4028961111942436e1), PW_R(7.535286353449927e-32), PW_R(-9.228064313411183e-48)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 24: basic ports 2 4 5 */
    {{2, 4, 5}, UINT32_C(0x00000008),
     {{PW_R(5.8289257463017e-17), PW_R(-8.291028218957086e0), PW_R(2.2215743156932013e0)},
      {PW_R(2.201448055597122e1), PW_R(1.758850571372794e2), PW_R(-2.1539707224101857e-14)},
      {PW_R(2.201448055597122e1), PW_R(-1.7588505713727935e2), PW_R(2.153970722410185e-14)}},
     {PW_R(-3.732050807568879e0), PW_R(7.917135874988627e1), PW_R(-7.917135874988624e1)}},
    /* 25: basic ports 2 4 6 */
    {{2, 4, 6}, UINT32_C(0x00000002),
     {{PW_R(-1.0377384098796942e0), PW_R(0e0), PW_R(2.2215743156932e0)},
      {PW_R(2.201448055597122e1), PW_R(1.7588505713727932e2), PW_R(-2.1539707224101848e-14)},
      {PW_R(-2.2014480555971215e1), PW_R(1.758850571372793e2), PW_R(-2.1539707224101844e-14)}},
     {PW_R(6.123233995736766e-17), PW_R(-7.917135874988622e1), PW_R(-7.917135874988621e1)}},
    /* 26: basic ports 2 5 7 */
    {{2, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(1.037738409879694e0), PW_R(4.663140597041359e-16), PW_R(2.2215743156931995e0)},
      {PW_R(2.2014480555971215e1), PW_R(-1.7588505713727935e2), PW_R(2.153970722410185e-14)},
      {PW_R(-2.2014480555971218e1), PW_R(-1.7588505713727938e2), PW_R(2.1539707224101854e-14)}},
     {PW_R(2.6205505742319918e-17), PW_R(-7.917135874988624e1), PW_R(-7.917135874988625e1)}},
    /* 27: basic ports 2 6 7 */
    {{2, 6, 7}, UINT32_C(0x00000002),
     {{PW_R(2.3315702985206794e-16), PW_R(8.291028218957086e0), PW_R(2.221574315693198e0)},
      {PW_R(-2.201448055597121e1), PW_R(1.7588505713727932e2), PW_R(-2.1539707224101848e-14)},
      {PW_R(-2.201448055597122e1), PW_R(-1.7588505713727932e2), PW_R(2.1539707224101848e-14)}},
     {PW_R(-3.732050807568879e0), PW_R(-7.917135874988622e1), PW_R(7.917135874988622e1)}},
    /* 28: basic ports 3 4 5 */
    {{3, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(1.5618559464625186e-17), PW_R(-2.2215743156931995e0), PW_R(5.952690438157169e-1)},
      {PW_R(2.2014480555971218e1), PW_R(8.657320733851362e-15), PW_R(4.712825902063586e1)},
      {PW_R(2.2014480555971215e1), PW_R(-8.65732073385136e-15), PW_R(-4.7128259020635845e1)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 29: basic ports 3 4 7 */
    {{3, 4, 7}, UINT32_C(0x00000004),
     {{PW_R(2.780611688820213e-1), PW_R(-2.2215743156931995e0), PW_R(3.1237118929250375e-16)},
      {PW_R(2.201448055597122e1), PW_R(8.657320733851362e-15), PW_R(4.712825902063586e1)},
      {PW_R(-2.2014480555971218e1), PW_R(8.657320733851362e-15), PW_R(4.7128259020635845e1)}},
     {PW_R(-1.8143350654358813e-17), PW_R(-2.1213901640706712e1), PW_R(-2.1213901640706705e1)}},
    /* 30: basic ports 3 5 6 */
    {{3, 5, 6}, UINT32_C(0x00000001),
     {{PW_R(-2.7806116888202137e-1), PW_R(-2.2215743156932e0), PW_R(1.2494847571700149e-16)},
      {PW_R(2.2014480555971218e1), PW_R(-8.65732073385136e-15), PW_R(-4.712825902063585e1)},
      {PW_R(-2.2014480555971218e1), PW_R(-8.657320733851362e-15), PW_R(-4.712825902063586e1)}},
     {PW_R(5.624321222763764e-17), PW_R(-2.121390164070671e1), PW_R(-2.1213901640706712e1)}},
    /* 31: basic ports 3 6 7 */
    {{3, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(-6.247423785850074e-17), PW_R(-2.2215743156931995e0), PW_R(-5.952690438157163e-1)},
      {PW_R(-2.2014480555971218e1), PW_R(-8.65732073385136e-15), PW_R(-4.712825902063585e1)},
      {PW_R(-2.2014480555971218e1), PW_R(8.65732073385136e-15), PW_R(4.712825902063585e1)}},
     {PW_R(0e0), PW_R(0e0), PW_R(-0e0)}},
    /* 32: basic ports 4 5 6 */
    {{4, 5, 6}, UINT32_C(0x00000003),
     {{PW_R(2.2014480555971218e1), PW_R(1.7588505713727938e2), PW_R(-9.892340596242175e-15)},
      {PW_R(2.2014480555971218e1), PW_R(0e0), PW_R(-4.712825902063586e1)},
      {PW_R(-1.2365425745302719e-15), PW_R(1.7588505713727932e2), PW_R(-4.712825902063587e1)}},
     {PW_R(-7.917135874988625e1), PW_R(-2.1213901640706712e1), PW_R(-1.0038526039059295e2)}},
    /* 33: basic ports 4 5 7 */
    {{4, 5, 7}, UINT32_C(0x0000000C),
     {{PW_R(2.2014480555971218e1), PW_R(9.892340596242177e-15), PW_R(4.712825902063586e1)},
      {PW_R(2.2014480555971218e1), PW_R(-1.7588505713727938e2), PW_R(2.4730851490605443e-14)},
      {PW_R(1.236542574530272e-15), PW_R(-1.7588505713727938e2), PW_R(4.712825902063589e1)}},
     {PW_R(-2.121390164070671e1), PW_R(-7.917135874988625e1), PW_R(-1.0038526039059296e2)}},
    /* 34: basic ports 4 6 7 */
    {{4, 6, 7}, UINT32_C(0x00000006),
     {{PW_R(4.9461702981210876e-15), PW_R(1.7588505713727935e2), PW_R(4.7128259020635824e1)},
      {PW_R(-2.201448055597121e1), PW_R(1.7588505713727932e2), PW_R(-2.4730851490605437e-14)},
      {PW_R(-2.2014480555971218e1), PW_R(0e0), PW_R(4.712825902063586e1)}},
     {PW_R(-1.0038526039059295e2), PW_R(-7.917135874988622e1), PW_R(-2.1213901640706712e1)}},
    /* 35: basic ports 5 6 7 */
    {{5, 6, 7}, UINT32_C(0x00000009),
     {{PW_R(-4.946170298121088e-15), PW_R(-1.758850571372794e2), PW_R(-4.712825902063584e1)},
      {PW_R(-2.2014480555971218e1), PW_R(-9.892340596242177e-15), PW_R(-4.712825902063586e1)},
      {PW_R(-2.2014480555971225e1), PW_R(-1.7588505713727943e2), PW_R(9.892340596242177e-15)}},
     {PW_R(-1.0038526039059296e2), PW_R(-2.1213901640706712e1), PW_R(-7.917135874988628e1)}},
};

static const pw_facet pw_facets[PW_FACET_COUNT] = {
    {{PW_R(1e0), PW_R(-8.557192996550232e-34), PW_R(5.239769506455695e-50)}, PW_R(4.5424646630090916e-2)},
    {{PW_R(-1e0), PW_R(8.557192996550232e-34), PW_R(-5.239769506455695e-50)}, PW_R(4.5424646630090916e-2)},
    {{PW_R(1.2419497784667209e-1), PW_R(-9.922578331651832e-1), PW_R(6.075826896573151e-17)}, PW_R(4.522877611654122e-1)},
    {{PW_R(-1.2419497784667209e-1), PW_R(9.922578331651832e-1), PW_R(-6.075826896573151e-17)}, PW_R(4.522877611654122e-1)},
    {{PW_R(-1.2419497784667206e-1), PW_R(-9.922578331651832e-1), PW_R(6.075826896573151e-17)}, PW_R(4.522877611654122e-1)},
    {{PW_R(1.2419497784667206e-1), PW_R(9.922578331651832e-1), PW_R(-6.075826896573151e-17)}, PW_R(4.522877611654122e-1)},
    {{PW_R(4.23221582616505e-1), PW_R(-1.1095620972095236e-16), PW_R(-9.060262093381078e-1)}, PW_R(4.270553913168407e-1)},
    {{PW_R(-4.23221582616505e-1), PW_R(1.1095620972095236e-16), PW_R(9.060262093381078e-1)}, PW_R(4.270553913168407e-1)},
    {{PW_R(-4.2322158261650494e-1), PW_R(-1.1095620972095236e-16), PW_R(-9.060262093381078e-1)}, PW_R(4.270553913168407e-1)},
    {{PW_R(4.2322158261650494e-1), PW_R(1.1095620972095236e-16), PW_R(9.060262093381078e-1)}, PW_R(4.270553913168407e-1)},
    {{PW_R(-8.852070747075345e-18), PW_R(9.659258262890684e-1), PW_R(-2.5881904510252074e-1)}, PW_R(5.567877283621678e-1)},
    {{PW_R(8.852070747075345e-18), PW_R(-9.659258262890684e-1), PW_R(2.5881904510252074e-1)}, PW_R(5.567877283621678e-1)},
    {{PW_R(3.5408282988301375e-17), PW_R(9.659258262890684e-1), PW_R(2.588190451025205e-1)}, PW_R(5.567877283621678e-1)},
    {{PW_R(-3.5408282988301375e-17), PW_R(-9.659258262890684e-1), PW_R(-2.588190451025205e-1)}, PW_R(5.567877283621677e-1)},
};

static inline int pw_sign(int v)
{
    return (v > 0) - (v < 0);
}

/* Row of pw_onoff for a command; each argument is taken by its sign. */
static inline int pw_onoff_row(int roll, int pitch, int yaw)
{
    return (pw_sign(roll) + 1) * 9 + (pw_sign(pitch) + 1) * 3 + (pw_sign(yaw) + 1);
}

/* Valves to open for a command; each argument is taken by its sign. */
static inline pw_mask pw_onoff_mask(int roll, int pitch, int yaw)
{
    return pw_onoff[pw_onoff_row(roll, pitch, yaw)].mask;
}

static inline pw_real pw_dot3(const pw_real a[3], const pw_real b[3])
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/* Torque (N.m) the ports give for the duty cycles duty[PW_PORT_COUNT]. */
static inline void pw_torque_for_duty(const pw_real duty[PW_PORT_COUNT], pw_real torque_nm[3])
{
    int i, k;
    for (k = 0; k < 3; ++k) {
        torque_nm[k] = PW_R(0.0);
    }
    for (i = 0; i < PW_PORT_COUNT; ++i) {
        for (k = 0; k < 3; ++k) {
            torque_nm[k] += pw_ports[i].torque_nm[k] * duty[i];
        }
    }
}

/*
 * Least-gas duty cycles for the torque command torque_nm (roll, pitch, yaw,
 * N.m about the CG). Writes duty[PW_PORT_COUNT], each in [0, 1], and, when
 * scale is not NULL, the fraction of the command achieved along its own
 * direction. Returns PW_EXACT, PW_SCALED (out of reach: scaled down to the
 * boundary of the attainable set) or PW_BAD_COMMAND.
 * Cost: PW_FACET_COUNT dot products (twice when out of reach), then up to
 * PW_REGION_COUNT region tests of 9 multiply-adds each.
 */
static inline int pw_duty_cycles(const pw_real torque_nm[3], pw_real duty[PW_PORT_COUNT],
                                 pw_real *scale)
{
    pw_real target[3];
    pw_real s = PW_R(1.0);
    pw_real least = PW_R(0.0);
    int status = PW_EXACT;
    int best = 0;
    int f, r, k, i;

    for (i = 0; i < PW_PORT_COUNT; ++i) {
        duty[i] = PW_R(0.0);
    }
    if (scale != 0) {
        *scale = PW_R(0.0);
    }
    for (k = 0; k < 3; ++k) {
        /* NaN and infinity give NaN here; every finite value gives 0. */
        pw_real z = torque_nm[k] - torque_nm[k];
        if (!(z == PW_R(0.0))) {
            return PW_BAD_COMMAND;
        }
    }

    for (f = 0; f < PW_FACET_COUNT; ++f) {
        if (pw_dot3(pw_facets[f].normal, torque_nm) > pw_facets[f].offset_nm + PW_ENVELOPE_SLACK_NM) {
            status = PW_SCALED;
            break;
        }
    }
    if (status == PW_SCALED) {
        for (f = 0; f < PW_FACET_COUNT; ++f) {
            pw_real d = pw_dot3(pw_facets[f].normal, torque_nm);
            if (d > PW_R(0.0)) {
                pw_real q = pw_facets[f].offset_nm / d;
                if (q < s) {
                    s = q;
                }
            }
        }
        if (s < PW_R(0.0)) {
            s = PW_R(0.0);
        }
    }
    for (k = 0; k < 3; ++k) {
        target[k] = torque_nm[k] * s;
    }

    /* First region within the slack; failing that, the least violated one. */
    for (r = 0; r < PW_REGION_COUNT; ++r) {
        pw_real worst = PW_R(0.0);
        for (k = 0; k < PW_BASIC_COUNT; ++k) {
            pw_real u = pw_dot3(pw_regions[r].map[k], target) + pw_regions[r].offset[k];
            if (-u > worst) {
                worst = -u;
            }
            if (u - PW_R(1.0) > worst) {
                worst = u - PW_R(1.0);
            }
        }
        if (r == 0 || worst < least) {
            least = worst;
            best = r;
        }
        if (worst <= PW_REGION_SLACK) {
            break;
        }
    }

    for (i = 0; i < PW_PORT_COUNT; ++i) {
        if ((pw_regions[best].full_on >> i) & 1u) {
            duty[i] = PW_R(1.0);
        }
    }
    for (k = 0; k < PW_BASIC_COUNT; ++k) {
        pw_real u = pw_dot3(pw_regions[best].map[k], target) + pw_regions[best].offset[k];
        if (u < PW_R(0.0)) {
            u = PW_R(0.0);
        }
        if (u > PW_R(1.0)) {
            u = PW_R(1.0);
        }
        duty[pw_regions[best].basic[k]] = u;
    }
    if (scale != 0) {
        *scale = s;
    }
    return status;
}

#endif /* PORTWRIGHT_TABLES_H */
