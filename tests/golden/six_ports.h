/*
 * portwright firmware allocation tables (tables format 1)
 *
 * Layout:       six-port golden case
 * Flight state: coast
 * Ports:        6 (bit i of a valve mask is port i)
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
 *   pw_grid[p]     duty cycles on a regular grid of commands: point
 *                  (i, j, k) of the roll, pitch and yaw indices is
 *                  p = (i*PW_GRID_POINTS_PER_AXIS + j)*PW_GRID_POINTS_PER_AXIS + k,
 *                  command pw_grid_low_nm + index*(pw_grid_high_nm - pw_grid_low_nm)
 *                  / 1 per axis; scale < 1 where the command was out of reach.
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
#define PW_ENVELOPE_SLACK_NM PW_R(6.75e-7)
#else
#define PW_ENVELOPE_SLACK_NM PW_R(6.75e-10)
#endif
#endif

#define PW_PORT_COUNT 6
typedef uint32_t pw_mask; /* valve masks: bit i = port i */
#define PW_BASIC_COUNT 3 /* basic ports per region = axes the map follows */
#define PW_MAP_ROLL 1 /* 1 when the map follows roll */
#define PW_MAP_PITCH 1 /* 1 when the map follows pitch */
#define PW_MAP_YAW 1 /* 1 when the map follows yaw */
#define PW_ONOFF_ROWS 27
#define PW_ONOFF_ALL_OFF_ROW 13
#define PW_REGION_COUNT 12
#define PW_FACET_COUNT 12
#define PW_GRID_POINTS_PER_AXIS 2
#define PW_GRID_COUNT 8

/* The rule the on/off rows were chosen by (see the comment at the top). */
#define PW_ONOFF_FRACTION PW_R(5e-1)
#define PW_ONOFF_TOLERANCE PW_R(1e-1)
#define PW_ONOFF_COMPARISON_TOLERANCE PW_R(1e-9)
#define PW_ONOFF_NOISE_FLOOR_NM PW_R(1.0992640687119287e-9)
static const pw_real pw_onoff_best_positive_nm[3] = {PW_R(2.7e-2), PW_R(1.0992640687119286e0), PW_R(1.0992640687119286e0)}; /* roll, pitch, yaw */
static const pw_real pw_onoff_best_negative_nm[3] = {PW_R(2.7000000000000003e-2), PW_R(6.750000000000002e-1), PW_R(6.750000000000002e-1)}; /* magnitudes */

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

typedef struct {
    pw_real torque_nm[3]; /* the command */
    pw_real scale;        /* fraction achieved, 1 inside the envelope */
    pw_real duty[PW_PORT_COUNT];
} pw_grid_point;

static const pw_port pw_ports[PW_PORT_COUNT] = {
    {"radial-0", {PW_R(0e0), PW_R(-0e0), PW_R(6.75e-1)}, PW_R(3.399054043259761e-3)}, /* 0 */
    {"radial-1", {PW_R(0e0), PW_R(-6.75e-1), PW_R(4.133182947122317e-17)}, PW_R(3.399054043259761e-3)}, /* 1 */
    {"radial-2", {PW_R(0e0), PW_R(-8.266365894244634e-17), PW_R(-6.75e-1)}, PW_R(3.399054043259761e-3)}, /* 2 */
    {"radial-3", {PW_R(1.5407439555097887e-33), PW_R(6.75e-1), PW_R(-1.2399548841366951e-16)}, PW_R(3.399054043259761e-3)}, /* 3 */
    {"roll-0", {PW_R(2.7e-2), PW_R(2.1213203435596426e-1), PW_R(2.1213203435596423e-1)}, PW_R(2.2660360288398406e-3)}, /* 4 */
    {"roll-2", {PW_R(-2.7000000000000003e-2), PW_R(2.121320343559643e-1), PW_R(2.1213203435596423e-1)}, PW_R(2.2660360288398406e-3)}, /* 5 */
};

static const pw_onoff_entry pw_onoff[PW_ONOFF_ROWS] = {
    /* 0: command (-1, -1, -1), meets */
    {{-1, -1, -1}, UINT32_C(0x00000026), {PW_R(-2.7000000000000003e-2), PW_R(-4.628679656440359e-1), PW_R(-4.628679656440358e-1)}, {PW_R(7.928932188134525e-1), PW_R(-7.928932188134525e-1)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 1: command (-1, -1, 0), near_miss */
    {{-1, -1, 0}, UINT32_C(0x00000022), {PW_R(-2.7000000000000003e-2), PW_R(-4.6286796564403576e-1), PW_R(2.1213203435596426e-1)}, {PW_R(-7.071067811865476e-1), PW_R(-7.928932188134523e-1)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766754e-2)},
    /* 2: command (-1, -1, 1), meets */
    {{-1, -1, 1}, UINT32_C(0x00000023), {PW_R(-2.7000000000000003e-2), PW_R(-4.6286796564403576e-1), PW_R(8.871320343559643e-1)}, {PW_R(-2.2071067811865475e0), PW_R(-7.928932188134523e-1)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 3: command (-1, 0, -1), near_miss */
    {{-1, 0, -1}, UINT32_C(0x00000024), {PW_R(-2.7000000000000003e-2), PW_R(2.1213203435596423e-1), PW_R(-4.628679656440358e-1)}, {PW_R(7.928932188134525e-1), PW_R(7.071067811865475e-1)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766751e-2)},
    /* 4: command (-1, 0, 0), near_miss */
    {{-1, 0, 0}, UINT32_C(0x00000020), {PW_R(-2.7000000000000003e-2), PW_R(2.121320343559643e-1), PW_R(2.1213203435596423e-1)}, {PW_R(-7.071067811865475e-1), PW_R(7.071067811865477e-1)}, PW_R(2.2660360288398406e-3), PW_ONOFF_NEAR_MISS, PW_R(1.8595281733533509e-1)},
    /* 5: command (-1, 0, 1), near_miss */
    {{-1, 0, 1}, UINT32_C(0x00000021), {PW_R(-2.7000000000000003e-2), PW_R(2.121320343559643e-1), PW_R(8.871320343559643e-1)}, {PW_R(-2.2071067811865475e0), PW_R(7.071067811865477e-1)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766758e-2)},
    /* 6: command (-1, 1, -1), meets */
    {{-1, 1, -1}, UINT32_C(0x0000002C), {PW_R(-2.7000000000000003e-2), PW_R(8.871320343559642e-1), PW_R(-4.6286796564403593e-1)}, {PW_R(7.928932188134528e-1), PW_R(2.2071067811865475e0)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 7: command (-1, 1, 0), near_miss */
    {{-1, 1, 0}, UINT32_C(0x00000028), {PW_R(-2.7000000000000003e-2), PW_R(8.871320343559643e-1), PW_R(2.1213203435596412e-1)}, {PW_R(-7.071067811865472e-1), PW_R(2.207106781186548e0)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766742e-2)},
    /* 8: command (-1, 1, 1), meets */
    {{-1, 1, 1}, UINT32_C(0x00000029), {PW_R(-2.7000000000000003e-2), PW_R(8.871320343559643e-1), PW_R(8.871320343559641e-1)}, {PW_R(-2.207106781186547e0), PW_R(2.207106781186548e0)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 9: command (0, -1, -1), meets */
    {{0, -1, -1}, UINT32_C(0x00000006), {PW_R(0e0), PW_R(-6.750000000000002e-1), PW_R(-6.75e-1)}, {PW_R(1.5e0), PW_R(-1.5000000000000002e0)}, PW_R(6.798108086519522e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 10: command (0, -1, 0), meets */
    {{0, -1, 0}, UINT32_C(0x00000002), {PW_R(0e0), PW_R(-6.75e-1), PW_R(4.133182947122317e-17)}, {PW_R(-9.184850993605148e-17), PW_R(-1.5e0)}, PW_R(3.399054043259761e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 11: command (0, -1, 1), meets */
    {{0, -1, 1}, UINT32_C(0x00000003), {PW_R(0e0), PW_R(-6.75e-1), PW_R(6.75e-1)}, {PW_R(-1.5e0), PW_R(-1.5e0)}, PW_R(6.798108086519522e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 12: command (0, 0, -1), meets */
    {{0, 0, -1}, UINT32_C(0x00000004), {PW_R(0e0), PW_R(-8.266365894244634e-17), PW_R(-6.75e-1)}, {PW_R(1.5e0), PW_R(-1.8369701987210297e-16)}, PW_R(3.399054043259761e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 13: command (0, 0, 0), all_off */
    {{0, 0, 0}, UINT32_C(0x00000000), {PW_R(0e0), PW_R(0e0), PW_R(0e0)}, {PW_R(0e0), PW_R(0e0)}, PW_R(0e0), PW_ONOFF_ALL_OFF, PW_R(0e0)},
    /* 14: command (0, 0, 1), meets */
    {{0, 0, 1}, UINT32_C(0x00000001), {PW_R(0e0), PW_R(0e0), PW_R(6.75e-1)}, {PW_R(-1.5e0), PW_R(0e0)}, PW_R(3.399054043259761e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 15: command (0, 1, -1), meets */
    {{0, 1, -1}, UINT32_C(0x0000000C), {PW_R(1.5407439555097887e-33), PW_R(6.749999999999999e-1), PW_R(-6.750000000000002e-1)}, {PW_R(1.5000000000000002e0), PW_R(1.4999999999999998e0)}, PW_R(6.798108086519522e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 16: command (0, 1, 0), meets */
    {{0, 1, 0}, UINT32_C(0x00000008), {PW_R(1.5407439555097887e-33), PW_R(6.75e-1), PW_R(-1.2399548841366951e-16)}, {PW_R(2.755455298081545e-16), PW_R(1.5e0)}, PW_R(3.399054043259761e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 17: command (0, 1, 1), meets */
    {{0, 1, 1}, UINT32_C(0x00000009), {PW_R(1.5407439555097887e-33), PW_R(6.75e-1), PW_R(6.749999999999999e-1)}, {PW_R(-1.4999999999999998e0), PW_R(1.5e0)}, PW_R(6.798108086519522e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 18: command (1, -1, -1), meets */
    {{1, -1, -1}, UINT32_C(0x00000016), {PW_R(2.7e-2), PW_R(-4.628679656440359e-1), PW_R(-4.628679656440358e-1)}, {PW_R(7.928932188134525e-1), PW_R(-7.928932188134526e-1)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 19: command (1, -1, 0), near_miss */
    {{1, -1, 0}, UINT32_C(0x00000012), {PW_R(2.7e-2), PW_R(-4.6286796564403576e-1), PW_R(2.1213203435596426e-1)}, {PW_R(-7.071067811865476e-1), PW_R(-7.928932188134524e-1)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766754e-2)},
    /* 20: command (1, -1, 1), meets */
    {{1, -1, 1}, UINT32_C(0x00000013), {PW_R(2.7e-2), PW_R(-4.6286796564403576e-1), PW_R(8.871320343559643e-1)}, {PW_R(-2.2071067811865475e0), PW_R(-7.928932188134524e-1)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 21: command (1, 0, -1), near_miss */
    {{1, 0, -1}, UINT32_C(0x00000014), {PW_R(2.7e-2), PW_R(2.1213203435596417e-1), PW_R(-4.628679656440358e-1)}, {PW_R(7.928932188134525e-1), PW_R(7.071067811865474e-1)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766746e-2)},
    /* 22: command (1, 0, 0), near_miss */
    {{1, 0, 0}, UINT32_C(0x00000010), {PW_R(2.7e-2), PW_R(2.1213203435596426e-1), PW_R(2.1213203435596423e-1)}, {PW_R(-7.071067811865475e-1), PW_R(7.071067811865476e-1)}, PW_R(2.2660360288398406e-3), PW_ONOFF_NEAR_MISS, PW_R(1.8595281733533506e-1)},
    /* 23: command (1, 0, 1), near_miss */
    {{1, 0, 1}, UINT32_C(0x00000011), {PW_R(2.7e-2), PW_R(2.1213203435596426e-1), PW_R(8.871320343559643e-1)}, {PW_R(-2.2071067811865475e0), PW_R(7.071067811865476e-1)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766754e-2)},
    /* 24: command (1, 1, -1), meets */
    {{1, 1, -1}, UINT32_C(0x0000001C), {PW_R(2.7e-2), PW_R(8.871320343559642e-1), PW_R(-4.6286796564403593e-1)}, {PW_R(7.928932188134528e-1), PW_R(2.2071067811865475e0)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 25: command (1, 1, 0), near_miss */
    {{1, 1, 0}, UINT32_C(0x00000018), {PW_R(2.7e-2), PW_R(8.871320343559643e-1), PW_R(2.1213203435596412e-1)}, {PW_R(-7.071067811865472e-1), PW_R(2.2071067811865475e0)}, PW_R(5.665090072099602e-3), PW_ONOFF_NEAR_MISS, PW_R(9.297640866766742e-2)},
    /* 26: command (1, 1, 1), meets */
    {{1, 1, 1}, UINT32_C(0x00000019), {PW_R(2.7e-2), PW_R(8.871320343559643e-1), PW_R(8.871320343559641e-1)}, {PW_R(-2.207106781186547e0), PW_R(2.2071067811865475e0)}, PW_R(9.064144115359362e-3), PW_ONOFF_MEETS, PW_R(0e0)},
};

static const pw_region pw_regions[PW_REGION_COUNT] = {
    /* 0: basic ports 0 1 4 */
    {{0, 1, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.163961779730942e1), PW_R(9.071457771461873e-17), PW_R(1.4814814814814814e0)},
      {PW_R(1.1639617797309423e1), PW_R(-1.4814814814814814e0), PW_R(-0e0)},
      {PW_R(3.703703703703704e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 1: basic ports 0 1 5 */
    {{0, 1, 5}, UINT32_C(0x00000000),
     {{PW_R(1.163961779730942e1), PW_R(9.071457771461873e-17), PW_R(1.4814814814814812e0)},
      {PW_R(-1.1639617797309423e1), PW_R(-1.4814814814814812e0), PW_R(-0e0)},
      {PW_R(-3.703703703703703e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(0e0), PW_R(0e0)}},
    /* 2: basic ports 0 3 4 */
    {{0, 3, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.1639617797309423e1), PW_R(2.721437331438563e-16), PW_R(1.4814814814814814e0)},
      {PW_R(-1.1639617797309423e1), PW_R(1.4814814814814814e0), PW_R(0e0)},
      {PW_R(3.703703703703704e1), PW_R(-8.454013473304738e-32), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 3: basic ports 0 3 5 */
    {{0, 3, 5}, UINT32_C(0x00000000),
     {{PW_R(1.1639617797309421e1), PW_R(2.721437331438562e-16), PW_R(1.4814814814814812e0)},
      {PW_R(1.1639617797309423e1), PW_R(1.4814814814814812e0), PW_R(0e0)},
      {PW_R(-3.703703703703703e1), PW_R(8.454013473304737e-32), PW_R(0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 4: basic ports 0 4 5 */
    {{0, 4, 5}, UINT32_C(0x00000008),
     {{PW_R(-1.7948016217235652e-15), PW_R(-1.481481481481481e0), PW_R(1.4814814814814814e0)},
      {PW_R(1.851851851851852e1), PW_R(2.357022603955158e0), PW_R(0e0)},
      {PW_R(-1.8518518518518515e1), PW_R(2.357022603955158e0), PW_R(0e0)}},
     {PW_R(9.999999999999999e-1), PW_R(-1.590990257669732e0), PW_R(-1.590990257669732e0)}},
    /* 5: basic ports 1 2 4 */
    {{1, 2, 4}, UINT32_C(0x00000000),
     {{PW_R(1.163961779730942e1), PW_R(-1.4814814814814814e0), PW_R(1.8142915542923746e-16)},
      {PW_R(1.163961779730942e1), PW_R(-9.071457771461873e-17), PW_R(-1.4814814814814814e0)},
      {PW_R(3.703703703703704e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 6: basic ports 1 2 5 */
    {{1, 2, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.1639617797309421e1), PW_R(-1.4814814814814812e0), PW_R(1.8142915542923746e-16)},
      {PW_R(-1.163961779730942e1), PW_R(-9.071457771461873e-17), PW_R(-1.4814814814814812e0)},
      {PW_R(-3.703703703703703e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(0e0), PW_R(0e0)}},
    /* 7: basic ports 1 4 5 */
    {{1, 4, 5}, UINT32_C(0x00000001),
     {{PW_R(-1.7948016217235656e-15), PW_R(-1.4814814814814814e0), PW_R(1.4814814814814818e0)},
      {PW_R(1.851851851851852e1), PW_R(1.4432600937258226e-16), PW_R(2.357022603955159e0)},
      {PW_R(-1.851851851851852e1), PW_R(1.4432600937258224e-16), PW_R(2.357022603955159e0)}},
     {PW_R(-1.0000000000000002e0), PW_R(-1.5909902576697323e0), PW_R(-1.5909902576697323e0)}},
    /* 8: basic ports 2 3 4 */
    {{2, 3, 4}, UINT32_C(0x00000000),
     {{PW_R(1.1639617797309423e1), PW_R(-2.721437331438563e-16), PW_R(-1.4814814814814814e0)},
      {PW_R(-1.163961779730942e1), PW_R(1.4814814814814814e0), PW_R(-1.8142915542923746e-16)},
      {PW_R(3.703703703703704e1), PW_R(-8.454013473304738e-32), PW_R(1.0353180540031245e-47)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 9: basic ports 2 3 5 */
    {{2, 3, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.1639617797309421e1), PW_R(-2.721437331438562e-16), PW_R(-1.4814814814814812e0)},
      {PW_R(1.1639617797309421e1), PW_R(1.4814814814814812e0), PW_R(-1.8142915542923746e-16)},
      {PW_R(-3.703703703703703e1), PW_R(8.454013473304737e-32), PW_R(-1.0353180540031243e-47)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 10: basic ports 2 4 5 */
    {{2, 4, 5}, UINT32_C(0x00000008),
     {{PW_R(1.7948016217235652e-15), PW_R(1.4814814814814812e0), PW_R(-1.4814814814814816e0)},
      {PW_R(1.851851851851852e1), PW_R(2.3570226039551585e0), PW_R(-2.8865201874516443e-16)},
      {PW_R(-1.8518518518518515e1), PW_R(2.3570226039551585e0), PW_R(-2.886520187451644e-16)}},
     {PW_R(-1e0), PW_R(-1.5909902576697321e0), PW_R(-1.5909902576697321e0)}},
    /* 11: basic ports 3 4 5 */
    {{3, 4, 5}, UINT32_C(0x00000001),
     {{PW_R(1.7948016217235652e-15), PW_R(1.4814814814814812e0), PW_R(-1.4814814814814816e0)},
      {PW_R(1.851851851851852e1), PW_R(4.329780281177466e-16), PW_R(2.3570226039551585e0)},
      {PW_R(-1.851851851851852e1), PW_R(4.3297802811774667e-16), PW_R(2.3570226039551585e0)}},
     {PW_R(1.0000000000000002e0), PW_R(-1.5909902576697321e0), PW_R(-1.5909902576697321e0)}},
};

static const pw_facet pw_facets[PW_FACET_COUNT] = {
    {{PW_R(1e0), PW_R(-1.1412918188961397e-33), PW_R(6.988396864521091e-50)}, PW_R(2.7e-2)},
    {{PW_R(-1e0), PW_R(1.1412918188961397e-33), PW_R(-6.988396864521091e-50)}, PW_R(2.7000000000000003e-2)},
    {{PW_R(-9.919971049598733e-1), PW_R(1.2626061837021896e-1), PW_R(-7.731233107272708e-18)}, PW_R(1.3879376106773098e-1)},
    {{PW_R(9.919971049598733e-1), PW_R(-1.2626061837021896e-1), PW_R(7.731233107272708e-18)}, PW_R(8.522591739989781e-2)},
    {{PW_R(-9.919971049598734e-1), PW_R(-1.2626061837021893e-1), PW_R(7.731233107272705e-18)}, PW_R(8.522591739989778e-2)},
    {{PW_R(9.919971049598734e-1), PW_R(1.2626061837021893e-1), PW_R(-7.731233107272705e-18)}, PW_R(1.3879376106773095e-1)},
    {{PW_R(-9.919971049598733e-1), PW_R(1.546246621454542e-17), PW_R(1.2626061837021896e-1)}, PW_R(1.3879376106773098e-1)},
    {{PW_R(9.919971049598733e-1), PW_R(-1.546246621454542e-17), PW_R(-1.2626061837021896e-1)}, PW_R(8.522591739989781e-2)},
    {{PW_R(-9.919971049598733e-1), PW_R(-1.5462466214545413e-17), PW_R(-1.2626061837021896e-1)}, PW_R(8.522591739989781e-2)},
    {{PW_R(9.919971049598733e-1), PW_R(1.5462466214545413e-17), PW_R(1.2626061837021896e-1)}, PW_R(1.3879376106773095e-1)},
    {{PW_R(-9.326798592705167e-16), PW_R(-7.071067811865474e-1), PW_R(7.071067811865477e-1)}, PW_R(9.545941546018393e-1)},
    {{PW_R(9.326798592705167e-16), PW_R(7.071067811865474e-1), PW_R(-7.071067811865477e-1)}, PW_R(9.545941546018393e-1)},
};

static const pw_real pw_grid_low_nm[3] = {PW_R(-2.7000000000000003e-2), PW_R(-6.750000000000002e-1), PW_R(-6.750000000000002e-1)};
static const pw_real pw_grid_high_nm[3] = {PW_R(2.7e-2), PW_R(1.0992640687119286e0), PW_R(1.0992640687119286e0)};

static const pw_grid_point pw_grid[PW_GRID_COUNT] = {
    {{PW_R(-2.7000000000000003e-2), PW_R(-6.750000000000002e-1), PW_R(-6.750000000000002e-1)}, PW_R(7.608788476340311e-1), {PW_R(0e0), PW_R(9.999999999999996e-1), PW_R(9.999999999999997e-1), PW_R(0e0), PW_R(0e0), PW_R(7.60878847634031e-1)}},
    {{PW_R(-2.7000000000000003e-2), PW_R(-6.750000000000002e-1), PW_R(1.0992640687119284e0)}, PW_R(7.60878847634031e-1), {PW_R(9.99999999999999e-1), PW_R(9.999999999999997e-1), PW_R(0e0), PW_R(0e0), PW_R(0e0), PW_R(7.608788476340309e-1)}},
    {{PW_R(-2.7000000000000003e-2), PW_R(1.0992640687119284e0), PW_R(-6.750000000000002e-1)}, PW_R(7.608788476340314e-1), {PW_R(0e0), PW_R(0e0), PW_R(9.999999999999999e-1), PW_R(9.999999999999997e-1), PW_R(0e0), PW_R(7.608788476340314e-1)}},
    {{PW_R(-2.7000000000000003e-2), PW_R(1.0992640687119284e0), PW_R(1.0992640687119284e0)}, PW_R(8.382395419204767e-1), {PW_R(1e0), PW_R(0e0), PW_R(0e0), PW_R(1e0), PW_R(1.617604580795231e-1), PW_R(9.999999999999996e-1)}},
    {{PW_R(2.7000000000000003e-2), PW_R(-6.750000000000002e-1), PW_R(-6.750000000000002e-1)}, PW_R(7.608788476340312e-1), {PW_R(0e0), PW_R(9.999999999999998e-1), PW_R(1e0), PW_R(0e0), PW_R(7.608788476340314e-1), PW_R(0e0)}},
    {{PW_R(2.7000000000000003e-2), PW_R(-6.750000000000002e-1), PW_R(1.0992640687119284e0)}, PW_R(7.608788476340312e-1), {PW_R(9.999999999999998e-1), PW_R(1e0), PW_R(0e0), PW_R(0e0), PW_R(7.608788476340314e-1), PW_R(0e0)}},
    {{PW_R(2.7000000000000003e-2), PW_R(1.0992640687119284e0), PW_R(-6.750000000000002e-1)}, PW_R(7.608788476340314e-1), {PW_R(0e0), PW_R(0e0), PW_R(1e0), PW_R(1e0), PW_R(7.608788476340315e-1), PW_R(0e0)}},
    {{PW_R(2.7000000000000003e-2), PW_R(1.0992640687119284e0), PW_R(1.0992640687119284e0)}, PW_R(8.382395419204764e-1), {PW_R(1e0), PW_R(0e0), PW_R(0e0), PW_R(1e0), PW_R(9.999999999999987e-1), PW_R(1.6176045807952244e-1)}},
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
