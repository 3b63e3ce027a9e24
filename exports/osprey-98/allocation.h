/*
 * portwright firmware allocation tables (tables format 1)
 *
 * Layout:       Osprey 98 (demo)
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
#define PW_ENVELOPE_SLACK_NM PW_R(1.3870731049055876e-6)
#else
#define PW_ENVELOPE_SLACK_NM PW_R(1.3870731049055876e-9)
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
#define PW_REGION_COUNT 44
#define PW_FACET_COUNT 30
#define PW_GRID_POINTS_PER_AXIS 0
#define PW_GRID_COUNT 0

/* The rule the on/off rows were chosen by (see the comment at the top). */
#define PW_ONOFF_FRACTION PW_R(5e-1)
#define PW_ONOFF_TOLERANCE PW_R(1e-1)
#define PW_ONOFF_COMPARISON_TOLERANCE PW_R(1e-9)
#define PW_ONOFF_NOISE_FLOOR_NM PW_R(1.5372557452251204e-9)
static const pw_real pw_onoff_best_positive_nm[3] = {PW_R(1.2350387496761106e-1), PW_R(1.5372557452251199e0), PW_R(1.5372557452251203e0)}; /* roll, pitch, yaw */
static const pw_real pw_onoff_best_negative_nm[3] = {PW_R(1.2350387496761103e-1), PW_R(1.5372557452251199e0), PW_R(1.5372557452251199e0)}; /* magnitudes */

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
    {"yaw-neg", {PW_R(0e0), PW_R(0e0), PW_R(-1.3870731049055876e0)}, PW_R(8.65305684719339e-3)}, /* 0 */
    {"yaw-pos", {PW_R(0e0), PW_R(1.6986746381060089e-16), PW_R(1.3870731049055876e0)}, PW_R(8.65305684719339e-3)}, /* 1 */
    {"pitch-pos", {PW_R(0e0), PW_R(1.3870731049055876e0), PW_R(-8.493373190530044e-17)}, PW_R(8.65305684719339e-3)}, /* 2 */
    {"pitch-neg", {PW_R(-6.162975822039155e-33), PW_R(-1.3870731049055876e0), PW_R(2.548011957159013e-16)}, PW_R(8.65305684719339e-3)}, /* 3 */
    {"roll-pos-a", {PW_R(6.298189016372126e-2), PW_R(8.717224237037079e-2), PW_R(-1.2449486418448552e-1)}, PW_R(3.945292714009313e-3)}, /* 4 */
    {"roll-pos-b", {PW_R(6.298189016372126e-2), PW_R(-8.717224237037076e-2), PW_R(1.2449486418448553e-1)}, PW_R(3.945292714009313e-3)}, /* 5 */
    {"roll-neg-a", {PW_R(-6.298189016372126e-2), PW_R(1.2449486418448552e-1), PW_R(-8.717224237037079e-2)}, PW_R(3.945292714009313e-3)}, /* 6 */
    {"roll-neg-b", {PW_R(-6.298189016372124e-2), PW_R(-1.244948641844855e-1), PW_R(8.71722423703708e-2)}, PW_R(3.945292714009313e-3)}, /* 7 */
};

static const pw_onoff_entry pw_onoff[PW_ONOFF_ROWS] = {
    /* 0: command (-1, -1, -1), meets */
    {{-1, -1, -1}, UINT32_C(0x000000C9), {PW_R(-1.1880702212654264e-1), PW_R(-1.3082651587406215e0), PW_R(-1.3082651587406213e0)}, {PW_R(-3.3544845896106246e0), PW_R(3.354484589610625e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 1: command (-1, -1, 0), meets */
    {{-1, -1, 0}, UINT32_C(0x00000048), {PW_R(-6.175193748380553e-2), PW_R(-1.237921764284123e0), PW_R(-8.54698842347384e-2)}, {PW_R(-8.729895442199747e-1), PW_R(2.2403406996684345e0)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 2: command (-1, -1, 1), meets */
    {{-1, -1, 1}, UINT32_C(0x000000CA), {PW_R(-1.1880702212654264e-1), PW_R(-1.308265158740621e0), PW_R(1.3082651587406218e0)}, {PW_R(3.3544845896106255e0), PW_R(3.354484589610624e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 3: command (-1, 0, -1), meets */
    {{-1, 0, -1}, UINT32_C(0x00000041), {PW_R(-6.175193748380553e-2), PW_R(1.2206364480632126e-1), PW_R(-1.4454552933251827e0)}, {PW_R(-4.360088521372874e0), PW_R(-1.2467582774844645e0)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 4: command (-1, 0, 0), meets */
    {{-1, 0, 0}, UINT32_C(0x00000040), {PW_R(-6.298189016372126e-2), PW_R(1.2449486418448552e-1), PW_R(-8.717224237037079e-2)}, {PW_R(-8.903774331381709e-1), PW_R(-1.2715907563844389e0)}, PW_R(3.945292714009313e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 5: command (-1, 0, 1), meets */
    {{-1, 0, 1}, UINT32_C(0x00000042), {PW_R(-6.175193748380553e-2), PW_R(1.2206364480632143e-1), PW_R(1.2745155248557056e0)}, {PW_R(2.6141094329329237e0), PW_R(-1.246758277484465e0)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 6: command (-1, 1, -1), meets */
    {{-1, 1, -1}, UINT32_C(0x000000C5), {PW_R(-1.1880702212654264e-1), PW_R(1.3082651587406215e0), PW_R(-1.3082651587406213e0)}, {PW_R(-3.3544845896106246e0), PW_R(-3.354484589610625e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 7: command (-1, 1, 0), meets */
    {{-1, 1, 0}, UINT32_C(0x00000044), {PW_R(-6.175193748380553e-2), PW_R(1.4820490538967652e0), PW_R(-8.546988423473872e-2)}, {PW_R(-8.729895442199755e-1), PW_R(-4.733857254637363e0)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 8: command (-1, 1, 1), meets */
    {{-1, 1, 1}, UINT32_C(0x000000C6), {PW_R(-1.1880702212654264e-1), PW_R(1.308265158740622e0), PW_R(1.3082651587406218e0)}, {PW_R(3.3544845896106255e0), PW_R(-3.354484589610626e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 9: command (0, -1, -1), meets */
    {{0, -1, -1}, UINT32_C(0x00000009), {PW_R(-6.042621088180449e-33), PW_R(-1.3599854090904442e0), PW_R(-1.359985409090444e0)}, {PW_R(-3.4870989771528986e0), PW_R(3.487098977152899e0)}, PW_R(1.6968148275089183e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 10: command (0, -1, 0), meets */
    {{0, -1, 0}, UINT32_C(0x00000008), {PW_R(-6.162975822039155e-33), PW_R(-1.3870731049055876e0), PW_R(2.548011957159013e-16)}, {PW_R(6.533283247152582e-16), PW_R(3.5565537490490096e0)}, PW_R(8.65305684719339e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 11: command (0, -1, 1), meets */
    {{0, -1, 1}, UINT32_C(0x0000000A), {PW_R(-6.042621088180449e-33), PW_R(-1.359985409090444e0), PW_R(1.3599854090904444e0)}, {PW_R(3.4870989771528995e0), PW_R(3.4870989771528986e0)}, PW_R(1.6968148275089183e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 12: command (0, 0, -1), meets */
    {{0, 0, -1}, UINT32_C(0x00000001), {PW_R(0e0), PW_R(0e0), PW_R(-1.3870731049055876e0)}, {PW_R(-3.5565537490490096e0), PW_R(0e0)}, PW_R(8.65305684719339e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 13: command (0, 0, 0), all_off */
    {{0, 0, 0}, UINT32_C(0x00000000), {PW_R(0e0), PW_R(0e0), PW_R(0e0)}, {PW_R(0e0), PW_R(0e0)}, PW_R(0e0), PW_ONOFF_ALL_OFF, PW_R(0e0)},
    /* 14: command (0, 0, 1), meets */
    {{0, 0, 1}, UINT32_C(0x00000002), {PW_R(0e0), PW_R(1.6986746381060089e-16), PW_R(1.3870731049055876e0)}, {PW_R(3.5565537490490096e0), PW_R(-4.3555221647683887e-16)}, PW_R(8.65305684719339e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 15: command (0, 1, -1), meets */
    {{0, 1, -1}, UINT32_C(0x00000005), {PW_R(0e0), PW_R(1.3599854090904442e0), PW_R(-1.3599854090904442e0)}, {PW_R(-3.487098977152899e0), PW_R(-3.487098977152899e0)}, PW_R(1.6968148275089183e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 16: command (0, 1, 0), meets */
    {{0, 1, 0}, UINT32_C(0x00000004), {PW_R(0e0), PW_R(1.3870731049055876e0), PW_R(-8.493373190530044e-17)}, {PW_R(-2.1777610823841943e-16), PW_R(-3.5565537490490096e0)}, PW_R(8.65305684719339e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 17: command (0, 1, 1), meets */
    {{0, 1, 1}, UINT32_C(0x00000006), {PW_R(0e0), PW_R(1.3599854090904444e0), PW_R(1.3599854090904442e0)}, {PW_R(3.487098977152899e0), PW_R(-3.4870989771528995e0)}, PW_R(1.6968148275089183e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 18: command (1, -1, -1), meets */
    {{1, -1, -1}, UINT32_C(0x00000039), {PW_R(1.1880702212654266e-1), PW_R(-1.3082651587406215e0), PW_R(-1.3082651587406213e0)}, {PW_R(-3.354484589610624e0), PW_R(3.354484589610625e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 19: command (1, -1, 0), meets */
    {{1, -1, 0}, UINT32_C(0x00000018), {PW_R(6.175193748380553e-2), PW_R(-1.2745155248557056e0), PW_R(-1.2206364480632101e-1)}, {PW_R(-1.2467582774844639e0), PW_R(2.6141094329329237e0)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 20: command (1, -1, 1), meets */
    {{1, -1, 1}, UINT32_C(0x0000003A), {PW_R(1.1880702212654266e-1), PW_R(-1.3082651587406213e0), PW_R(1.3082651587406218e0)}, {PW_R(3.354484589610626e0), PW_R(3.354484589610624e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 21: command (1, 0, -1), meets */
    {{1, 0, -1}, UINT32_C(0x00000011), {PW_R(6.175193748380553e-2), PW_R(8.546988423473864e-2), PW_R(-1.4820490538967652e0)}, {PW_R(-4.733857254637363e0), PW_R(-8.729895442199753e-1)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 22: command (1, 0, 0), meets */
    {{1, 0, 0}, UINT32_C(0x00000010), {PW_R(6.298189016372126e-2), PW_R(8.717224237037079e-2), PW_R(-1.2449486418448552e-1)}, {PW_R(-1.2715907563844389e0), PW_R(-8.903774331381709e-1)}, PW_R(3.945292714009313e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 23: command (1, 0, 1), meets */
    {{1, 0, 1}, UINT32_C(0x00000012), {PW_R(6.175193748380553e-2), PW_R(8.546988423473881e-2), PW_R(1.237921764284123e0)}, {PW_R(2.2403406996684345e0), PW_R(-8.729895442199758e-1)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 24: command (1, 1, -1), meets */
    {{1, 1, -1}, UINT32_C(0x00000035), {PW_R(1.1880702212654266e-1), PW_R(1.3082651587406215e0), PW_R(-1.3082651587406213e0)}, {PW_R(-3.354484589610624e0), PW_R(-3.354484589610625e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 25: command (1, 1, 0), meets */
    {{1, 1, 0}, UINT32_C(0x00000014), {PW_R(6.175193748380553e-2), PW_R(1.4454552933251827e0), PW_R(-1.2206364480632134e-1)}, {PW_R(-1.2467582774844648e0), PW_R(-4.360088521372874e0)}, PW_R(1.2352320523886798e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 26: command (1, 1, 1), meets */
    {{1, 1, 1}, UINT32_C(0x00000036), {PW_R(1.1880702212654266e-1), PW_R(1.3082651587406218e0), PW_R(1.3082651587406218e0)}, {PW_R(3.354484589610625e0), PW_R(-3.354484589610626e0)}, PW_R(2.3765123453501832e-2), PW_ONOFF_MEETS, PW_R(0e0)},
};

static const pw_region pw_regions[PW_REGION_COUNT] = {
    /* 0: basic ports 0 2 4 */
    {{0, 2, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.4250706465487437e0), PW_R(-4.414499837161467e-17), PW_R(-7.20942534653259e-1)},
      {PW_R(-9.978452091948153e-1), PW_R(7.20942534653259e-1), PW_R(0e0)},
      {PW_R(1.587758000594302e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 1: basic ports 0 2 5 */
    {{0, 2, 5}, UINT32_C(0x00000010),
     {{PW_R(1.425070646548744e0), PW_R(-4.414499837161467e-17), PW_R(-7.20942534653259e-1)},
      {PW_R(9.978452091948151e-1), PW_R(7.20942534653259e-1), PW_R(0e0)},
      {PW_R(1.587758000594302e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(-1.7950728587295245e-1), PW_R(-1.2569235473180662e-1), PW_R(-1e0)}},
    /* 2: basic ports 0 2 6 */
    {{0, 2, 6}, UINT32_C(0x00000000),
     {{PW_R(9.978452091948152e-1), PW_R(-4.414499837161467e-17), PW_R(-7.20942534653259e-1)},
      {PW_R(1.4250706465487437e0), PW_R(7.20942534653259e-1), PW_R(0e0)},
      {PW_R(-1.587758000594302e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(0e0)}},
    /* 3: basic ports 0 2 7 */
    {{0, 2, 7}, UINT32_C(0x00000040),
     {{PW_R(-9.978452091948157e-1), PW_R(-4.414499837161467e-17), PW_R(-7.20942534653259e-1)},
      {PW_R(-1.4250706465487437e0), PW_R(7.20942534653259e-1), PW_R(-0e0)},
      {PW_R(-1.5877580005943024e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-1.2569235473180668e-1), PW_R(-1.7950728587295245e-1), PW_R(-1.0000000000000002e0)}},
    /* 4: basic ports 0 3 4 */
    {{0, 3, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.4250706465487435e0), PW_R(-1.3243499511484398e-16), PW_R(-7.20942534653259e-1)},
      {PW_R(9.978452091948153e-1), PW_R(-7.20942534653259e-1), PW_R(-0e0)},
      {PW_R(1.587758000594302e1), PW_R(-7.054649199313802e-32), PW_R(-0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 5: basic ports 0 3 5 */
    {{0, 3, 5}, UINT32_C(0x00000010),
     {{PW_R(1.4250706465487437e0), PW_R(-1.3243499511484398e-16), PW_R(-7.20942534653259e-1)},
      {PW_R(-9.978452091948151e-1), PW_R(-7.20942534653259e-1), PW_R(-0e0)},
      {PW_R(1.587758000594302e1), PW_R(-7.054649199313802e-32), PW_R(-0e0)}},
     {PW_R(-1.7950728587295242e-1), PW_R(1.2569235473180662e-1), PW_R(-1e0)}},
    /* 6: basic ports 0 3 6 */
    {{0, 3, 6}, UINT32_C(0x00000080),
     {{PW_R(9.978452091948151e-1), PW_R(-1.3243499511484398e-16), PW_R(-7.20942534653259e-1)},
      {PW_R(-1.4250706465487437e0), PW_R(-7.20942534653259e-1), PW_R(-0e0)},
      {PW_R(-1.587758000594302e1), PW_R(7.054649199313802e-32), PW_R(0e0)}},
     {PW_R(1.2569235473180662e-1), PW_R(-1.795072858729524e-1), PW_R(-9.999999999999998e-1)}},
    /* 7: basic ports 0 3 7 */
    {{0, 3, 7}, UINT32_C(0x00000000),
     {{PW_R(-9.978452091948156e-1), PW_R(-1.3243499511484398e-16), PW_R(-7.20942534653259e-1)},
      {PW_R(1.4250706465487437e0), PW_R(-7.20942534653259e-1), PW_R(0e0)},
      {PW_R(-1.5877580005943024e1), PW_R(7.054649199313804e-32), PW_R(0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 8: basic ports 0 4 5 */
    {{0, 4, 5}, UINT32_C(0x00000008),
     {{PW_R(2.277912286163271e-16), PW_R(-1.0296126438406594e0), PW_R(-7.20942534653259e-1)},
      {PW_R(7.938790002971509e0), PW_R(5.735770772944421e0), PW_R(0e0)},
      {PW_R(7.938790002971511e0), PW_R(-5.735770772944421e0), PW_R(0e0)}},
     {PW_R(-1.4281480067421142e0), PW_R(7.95593337505474e0), PW_R(-7.95593337505474e0)}},
    /* 9: basic ports 0 4 6 */
    {{0, 4, 6}, UINT32_C(0x00000004),
     {{PW_R(-4.2722543735392826e-1), PW_R(-7.20942534653259e-1), PW_R(-7.20942534653259e-1)},
      {PW_R(9.338612874674022e0), PW_R(4.724399630515273e0), PW_R(0e0)},
      {PW_R(-6.538967131268999e0), PW_R(4.724399630515273e0), PW_R(-0e0)}},
     {PW_R(9.999999999999999e-1), PW_R(-6.55308766431363e0), PW_R(-6.55308766431363e0)}},
    /* 10: basic ports 0 4 7 */
    {{0, 4, 7}, UINT32_C(0x00000028),
     {{PW_R(-2.4229158557435584e0), PW_R(7.20942534653258e-1), PW_R(-7.209425346532589e-1)},
      {PW_R(5.2961905416586674e1), PW_R(-2.6793401733149903e1), PW_R(0e0)},
      {PW_R(3.708432541064366e1), PW_R(-2.6793401733149906e1), PW_R(0e0)}},
     {PW_R(1.305199640604758e0), PW_R(-4.2835688752600696e1), PW_R(-4.18356887526007e1)}},
    /* 11: basic ports 0 5 6 */
    {{0, 5, 6}, UINT32_C(0x00000014),
     {{PW_R(2.4229158557435597e0), PW_R(7.20942534653259e-1), PW_R(-7.20942534653259e-1)},
      {PW_R(5.296190541658666e1), PW_R(2.6793401733149892e1), PW_R(0e0)},
      {PW_R(3.708432541064363e1), PW_R(2.6793401733149892e1), PW_R(0e0)}},
     {PW_R(-1.305199640604759e0), PW_R(-4.2835688752600674e1), PW_R(-4.1835688752600674e1)}},
    /* 12: basic ports 0 5 7 */
    {{0, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(4.272254373539284e-1), PW_R(-7.209425346532591e-1), PW_R(-7.209425346532589e-1)},
      {PW_R(9.338612874674023e0), PW_R(-4.724399630515274e0), PW_R(0e0)},
      {PW_R(-6.538967131268999e0), PW_R(-4.724399630515274e0), PW_R(-0e0)}},
     {PW_R(-1e0), PW_R(-6.553087664313631e0), PW_R(-6.553087664313631e0)}},
    /* 13: basic ports 0 6 7 */
    {{0, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(-2.3925170312280547e-16), PW_R(-5.04809397380227e-1), PW_R(-7.209425346532589e-1)},
      {PW_R(-7.93879000297151e0), PW_R(4.016229932658618e0), PW_R(-0e0)},
      {PW_R(-7.938790002971512e0), PW_R(-4.016229932658619e0), PW_R(-0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(0e0)}},
    /* 14: basic ports 1 2 4 */
    {{1, 2, 4}, UINT32_C(0x00000020),
     {{PW_R(1.4250706465487437e0), PW_R(4.414499837161467e-17), PW_R(7.20942534653259e-1)},
      {PW_R(-9.978452091948156e-1), PW_R(7.20942534653259e-1), PW_R(-8.828999674322934e-17)},
      {PW_R(1.587758000594302e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-1.7950728587295245e-1), PW_R(1.2569235473180665e-1), PW_R(-1e0)}},
    /* 15: basic ports 1 2 5 */
    {{1, 2, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.425070646548744e0), PW_R(4.414499837161467e-17), PW_R(7.20942534653259e-1)},
      {PW_R(9.978452091948153e-1), PW_R(7.20942534653259e-1), PW_R(-8.828999674322934e-17)},
      {PW_R(1.587758000594302e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 16: basic ports 1 2 6 */
    {{1, 2, 6}, UINT32_C(0x00000000),
     {{PW_R(-9.978452091948152e-1), PW_R(4.414499837161467e-17), PW_R(7.20942534653259e-1)},
      {PW_R(1.425070646548744e0), PW_R(7.20942534653259e-1), PW_R(-8.828999674322934e-17)},
      {PW_R(-1.587758000594302e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 17: basic ports 1 2 7 */
    {{1, 2, 7}, UINT32_C(0x00000040),
     {{PW_R(9.978452091948157e-1), PW_R(4.414499837161467e-17), PW_R(7.20942534653259e-1)},
      {PW_R(-1.425070646548744e0), PW_R(7.20942534653259e-1), PW_R(-8.828999674322934e-17)},
      {PW_R(-1.5877580005943024e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(1.2569235473180668e-1), PW_R(-1.7950728587295245e-1), PW_R(-1.0000000000000002e0)}},
    /* 18: basic ports 1 3 4 */
    {{1, 3, 4}, UINT32_C(0x00000020),
     {{PW_R(1.4250706465487435e0), PW_R(1.3243499511484398e-16), PW_R(7.20942534653259e-1)},
      {PW_R(9.978452091948156e-1), PW_R(-7.20942534653259e-1), PW_R(8.828999674322934e-17)},
      {PW_R(1.587758000594302e1), PW_R(-7.054649199313802e-32), PW_R(8.639453561047087e-48)}},
     {PW_R(-1.7950728587295242e-1), PW_R(-1.2569235473180665e-1), PW_R(-1e0)}},
    /* 19: basic ports 1 3 5 */
    {{1, 3, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.4250706465487437e0), PW_R(1.3243499511484398e-16), PW_R(7.20942534653259e-1)},
      {PW_R(-9.978452091948153e-1), PW_R(-7.20942534653259e-1), PW_R(8.828999674322934e-17)},
      {PW_R(1.587758000594302e1), PW_R(-7.054649199313802e-32), PW_R(8.639453561047087e-48)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 20: basic ports 1 3 6 */
    {{1, 3, 6}, UINT32_C(0x00000080),
     {{PW_R(-9.978452091948151e-1), PW_R(1.3243499511484398e-16), PW_R(7.20942534653259e-1)},
      {PW_R(-1.425070646548744e0), PW_R(-7.20942534653259e-1), PW_R(8.828999674322934e-17)},
      {PW_R(-1.587758000594302e1), PW_R(7.054649199313802e-32), PW_R(-8.639453561047087e-48)}},
     {PW_R(-1.2569235473180662e-1), PW_R(-1.795072858729524e-1), PW_R(-9.999999999999998e-1)}},
    /* 21: basic ports 1 3 7 */
    {{1, 3, 7}, UINT32_C(0x00000000),
     {{PW_R(9.978452091948156e-1), PW_R(1.3243499511484398e-16), PW_R(7.20942534653259e-1)},
      {PW_R(1.425070646548744e0), PW_R(-7.20942534653259e-1), PW_R(8.828999674322934e-17)},
      {PW_R(-1.5877580005943024e1), PW_R(7.054649199313804e-32), PW_R(-8.63945356104709e-48)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 22: basic ports 1 4 5 */
    {{1, 4, 5}, UINT32_C(0x00000004),
     {{PW_R(-2.2779122861632705e-16), PW_R(1.0296126438406592e0), PW_R(7.209425346532587e-1)},
      {PW_R(7.938790002971509e0), PW_R(5.73577077294442e0), PW_R(-7.024293317729325e-16)},
      {PW_R(7.938790002971511e0), PW_R(-5.73577077294442e0), PW_R(7.024293317729325e-16)}},
     {PW_R(-1.428148006742114e0), PW_R(-7.955933375054738e0), PW_R(7.955933375054738e0)}},
    /* 23: basic ports 1 4 6 */
    {{1, 4, 6}, UINT32_C(0x00000004),
     {{PW_R(4.272254373539282e-1), PW_R(7.209425346532589e-1), PW_R(7.209425346532589e-1)},
      {PW_R(9.338612874674022e0), PW_R(4.724399630515272e0), PW_R(-5.785720885403467e-16)},
      {PW_R(-6.538967131268999e0), PW_R(4.724399630515272e0), PW_R(-5.785720885403467e-16)}},
     {PW_R(-9.999999999999998e-1), PW_R(-6.553087664313629e0), PW_R(-6.553087664313629e0)}},
    /* 24: basic ports 1 4 7 */
    {{1, 4, 7}, UINT32_C(0x00000028),
     {{PW_R(2.4229158557435584e0), PW_R(-7.20942534653258e-1), PW_R(7.209425346532589e-1)},
      {PW_R(5.296190541658669e1), PW_R(-2.6793401733149903e1), PW_R(3.2812453670771176e-15)},
      {PW_R(3.708432541064367e1), PW_R(-2.6793401733149906e1), PW_R(3.2812453670771184e-15)}},
     {PW_R(-1.305199640604758e0), PW_R(-4.2835688752600696e1), PW_R(-4.18356887526007e1)}},
    /* 25: basic ports 1 5 6 */
    {{1, 5, 6}, UINT32_C(0x00000014),
     {{PW_R(-2.4229158557435597e0), PW_R(-7.20942534653259e-1), PW_R(7.20942534653259e-1)},
      {PW_R(5.296190541658667e1), PW_R(2.6793401733149892e1), PW_R(-3.2812453670771164e-15)},
      {PW_R(3.708432541064364e1), PW_R(2.6793401733149892e1), PW_R(-3.2812453670771164e-15)}},
     {PW_R(1.305199640604759e0), PW_R(-4.2835688752600674e1), PW_R(-4.1835688752600674e1)}},
    /* 26: basic ports 1 5 7 */
    {{1, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(-4.2722543735392826e-1), PW_R(7.20942534653259e-1), PW_R(7.209425346532586e-1)},
      {PW_R(9.338612874674022e0), PW_R(-4.724399630515273e0), PW_R(5.785720885403467e-16)},
      {PW_R(-6.538967131268999e0), PW_R(-4.724399630515273e0), PW_R(5.785720885403469e-16)}},
     {PW_R(9.999999999999998e-1), PW_R(-6.55308766431363e0), PW_R(-6.55308766431363e0)}},
    /* 27: basic ports 1 6 7 */
    {{1, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(2.392517031228054e-16), PW_R(5.048093973802269e-1), PW_R(7.209425346532587e-1)},
      {PW_R(-7.93879000297151e0), PW_R(4.016229932658617e0), PW_R(-4.918463131670166e-16)},
      {PW_R(-7.938790002971512e0), PW_R(-4.016229932658618e0), PW_R(4.918463131670167e-16)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 28: basic ports 2 4 5 */
    {{2, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.5950113541520362e-16), PW_R(7.209425346532589e-1), PW_R(5.048093973802269e-1)},
      {PW_R(7.938790002971512e0), PW_R(-2.4592315658350834e-16), PW_R(-4.016229932658618e0)},
      {PW_R(7.93879000297151e0), PW_R(2.4592315658350834e-16), PW_R(4.016229932658618e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 29: basic ports 2 4 6 */
    {{2, 4, 6}, UINT32_C(0x00000001),
     {{PW_R(4.2722543735392826e-1), PW_R(7.20942534653259e-1), PW_R(7.20942534653259e-1)},
      {PW_R(6.538967131268998e0), PW_R(-2.8928604427017344e-16), PW_R(-4.724399630515273e0)},
      {PW_R(-9.338612874674022e0), PW_R(-2.8928604427017344e-16), PW_R(-4.724399630515273e0)}},
     {PW_R(1e0), PW_R(-6.55308766431363e0), PW_R(-6.55308766431363e0)}},
    /* 30: basic ports 2 4 7 */
    {{2, 4, 7}, UINT32_C(0x00000041),
     {{PW_R(-2.42291585574356e0), PW_R(7.209425346532586e-1), PW_R(-7.209425346532594e-1)},
      {PW_R(-3.708432541064369e1), PW_R(-1.64062268353856e-15), PW_R(-2.6793401733149924e1)},
      {PW_R(-5.2961905416586724e1), PW_R(-1.6406226835385606e-15), PW_R(-2.6793401733149928e1)}},
     {PW_R(-1.3051996406047597e0), PW_R(-4.183568875260073e1), PW_R(-4.283568875260074e1)}},
    /* 31: basic ports 2 5 6 */
    {{2, 5, 6}, UINT32_C(0x00000082),
     {{PW_R(2.422915855743559e0), PW_R(7.209425346532587e-1), PW_R(-7.209425346532587e-1)},
      {PW_R(-3.708432541064363e1), PW_R(1.6406226835385578e-15), PW_R(2.6793401733149885e1)},
      {PW_R(-5.296190541658665e1), PW_R(1.6406226835385578e-15), PW_R(2.6793401733149885e1)}},
     {PW_R(1.3051996406047588e0), PW_R(-4.1835688752600674e1), PW_R(-4.2835688752600674e1)}},
    /* 32: basic ports 2 5 7 */
    {{2, 5, 7}, UINT32_C(0x00000002),
     {{PW_R(-4.272254373539282e-1), PW_R(7.209425346532589e-1), PW_R(7.209425346532585e-1)},
      {PW_R(6.538967131268999e0), PW_R(2.892860442701733e-16), PW_R(4.724399630515272e0)},
      {PW_R(-9.338612874674022e0), PW_R(2.8928604427017334e-16), PW_R(4.724399630515272e0)}},
     {PW_R(-9.999999999999996e-1), PW_R(-6.553087664313629e0), PW_R(-6.553087664313629e0)}},
    /* 33: basic ports 2 6 7 */
    {{2, 6, 7}, UINT32_C(0x00000002),
     {{PW_R(3.4168684292449065e-16), PW_R(7.209425346532591e-1), PW_R(1.0296126438406592e0)},
      {PW_R(-7.938790002971512e0), PW_R(-3.512146658864662e-16), PW_R(-5.73577077294442e0)},
      {PW_R(-7.93879000297151e0), PW_R(3.512146658864663e-16), PW_R(5.735770772944421e0)}},
     {PW_R(-1.4281480067421142e0), PW_R(7.955933375054738e0), PW_R(-7.95593337505474e0)}},
    /* 34: basic ports 3 4 5 */
    {{3, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(1.5950113541520362e-16), PW_R(-7.209425346532589e-1), PW_R(-5.048093973802269e-1)},
      {PW_R(7.93879000297151e0), PW_R(-7.377694697505248e-16), PW_R(-4.016229932658618e0)},
      {PW_R(7.938790002971509e0), PW_R(7.377694697505248e-16), PW_R(4.016229932658618e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 35: basic ports 3 4 6 */
    {{3, 4, 6}, UINT32_C(0x00000001),
     {{PW_R(-4.272254373539284e-1), PW_R(-7.209425346532591e-1), PW_R(-7.209425346532591e-1)},
      {PW_R(6.538967131268999e0), PW_R(-8.678581328105201e-16), PW_R(-4.724399630515274e0)},
      {PW_R(-9.338612874674023e0), PW_R(-8.678581328105201e-16), PW_R(-4.724399630515274e0)}},
     {PW_R(-1.0000000000000002e0), PW_R(-6.553087664313631e0), PW_R(-6.553087664313631e0)}},
    /* 36: basic ports 3 4 7 */
    {{3, 4, 7}, UINT32_C(0x00000041),
     {{PW_R(2.4229158557435606e0), PW_R(-7.209425346532587e-1), PW_R(7.209425346532596e-1)},
      {PW_R(-3.70843254106437e1), PW_R(-4.921868050615681e-15), PW_R(-2.679340173314993e1)},
      {PW_R(-5.296190541658673e1), PW_R(-4.9218680506156815e-15), PW_R(-2.6793401733149935e1)}},
     {PW_R(1.3051996406047601e0), PW_R(-4.183568875260074e1), PW_R(-4.2835688752600745e1)}},
    /* 37: basic ports 3 5 6 */
    {{3, 5, 6}, UINT32_C(0x00000082),
     {{PW_R(-2.4229158557435597e0), PW_R(-7.20942534653259e-1), PW_R(7.20942534653259e-1)},
      {PW_R(-3.708432541064363e1), PW_R(4.9218680506156736e-15), PW_R(2.6793401733149892e1)},
      {PW_R(-5.296190541658666e1), PW_R(4.9218680506156736e-15), PW_R(2.6793401733149892e1)}},
     {PW_R(-1.305199640604759e0), PW_R(-4.183568875260068e1), PW_R(-4.283568875260068e1)}},
    /* 38: basic ports 3 5 7 */
    {{3, 5, 7}, UINT32_C(0x00000002),
     {{PW_R(4.2722543735392826e-1), PW_R(-7.20942534653259e-1), PW_R(-7.209425346532586e-1)},
      {PW_R(6.538967131268999e0), PW_R(8.678581328105198e-16), PW_R(4.724399630515273e0)},
      {PW_R(-9.338612874674022e0), PW_R(8.6785813281052e-16), PW_R(4.724399630515273e0)}},
     {PW_R(9.999999999999997e-1), PW_R(-6.55308766431363e0), PW_R(-6.55308766431363e0)}},
    /* 39: basic ports 3 6 7 */
    {{3, 6, 7}, UINT32_C(0x00000001),
     {{PW_R(-3.416868429244907e-16), PW_R(-7.209425346532591e-1), PW_R(-1.0296126438406594e0)},
      {PW_R(-7.938790002971512e0), PW_R(-1.0536439976593986e-15), PW_R(-5.735770772944421e0)},
      {PW_R(-7.93879000297151e0), PW_R(1.0536439976593988e-15), PW_R(5.735770772944422e0)}},
     {PW_R(-1.4281480067421144e0), PW_R(-7.95593337505474e0), PW_R(7.955933375054741e0)}},
    /* 40: basic ports 4 5 6 */
    {{4, 5, 6}, UINT32_C(0x00000006),
     {{PW_R(7.938790002971512e0), PW_R(2.3621998152576364e0), PW_R(-2.3621998152576364e0)},
      {PW_R(7.938790002971507e0), PW_R(1.3396700866574946e1), PW_R(1.3396700866574946e1)},
      {PW_R(-3.4864950128884184e-15), PW_R(1.575890068183258e1), PW_R(1.103450105131731e1)}},
     {PW_R(-4.440892098500626e-16), PW_R(-3.716440693298297e1), PW_R(-3.716440693298297e1)}},
    /* 41: basic ports 4 5 7 */
    {{4, 5, 7}, UINT32_C(0x00000009),
     {{PW_R(7.938790002971514e0), PW_R(-1.3396700866574959e1), PW_R(-1.3396700866574953e1)},
      {PW_R(7.93879000297151e0), PW_R(-2.3621998152576342e0), PW_R(2.362199815257637e0)},
      {PW_R(3.4864950128884216e-15), PW_R(-1.5758900681832595e1), PW_R(-1.1034501051317319e1)}},
     {PW_R(-3.7164406932983e1), PW_R(3.1086244689504383e-15), PW_R(-3.7164406932983e1)}},
    /* 42: basic ports 4 6 7 */
    {{4, 6, 7}, UINT32_C(0x00000009),
     {{PW_R(-5.229742519332633e-15), PW_R(-1.1034501051317323e1), PW_R(-1.5758900681832595e1)},
      {PW_R(-7.938790002971512e0), PW_R(2.3621998152576347e0), PW_R(-2.3621998152576373e0)},
      {PW_R(-7.9387900029715155e0), PW_R(-1.339670086657496e1), PW_R(-1.339670086657496e1)}},
     {PW_R(-3.7164406932983e1), PW_R(-3.1086244689504383e-15), PW_R(-3.716440693298301e1)}},
    /* 43: basic ports 5 6 7 */
    {{5, 6, 7}, UINT32_C(0x00000006),
     {{PW_R(5.229742519332627e-15), PW_R(1.1034501051317308e1), PW_R(1.5758900681832575e1)},
      {PW_R(-7.938790002971505e0), PW_R(1.3396700866574943e1), PW_R(1.3396700866574937e1)},
      {PW_R(-7.93879000297151e0), PW_R(-2.362199815257636e0), PW_R(2.362199815257636e0)}},
     {PW_R(-3.7164406932982956e1), PW_R(-3.7164406932982956e1), PW_R(8.881784197001252e-16)}},
};

static const pw_facet pw_facets[PW_FACET_COUNT] = {
    {{PW_R(1e0), PW_R(-2.2215757050738302e-33), PW_R(1.3603227881410956e-49)}, PW_R(1.2596378032744251e-1)},
    {{PW_R(-1e0), PW_R(2.2215757050738302e-33), PW_R(-1.3603227881410956e-49)}, PW_R(1.259637803274425e-1)},
    {{PW_R(8.105725868475873e-1), PW_R(-5.856381830543589e-1), PW_R(3.5859996316799625e-17)}, PW_R(9.362833126156358e-1)},
    {{PW_R(-8.105725868475873e-1), PW_R(5.856381830543589e-1), PW_R(-3.5859996316799625e-17)}, PW_R(9.362833126156359e-1)},
    {{PW_R(-8.10572586847587e-1), PW_R(-5.85638183054359e-1), PW_R(3.585999631679963e-17)}, PW_R(9.36283312615636e-1)},
    {{PW_R(8.10572586847587e-1), PW_R(5.85638183054359e-1), PW_R(-3.585999631679963e-17)}, PW_R(9.362833126156361e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(4.5141999561417334e-1), PW_R(-2.764150263500049e-17)}, PW_R(7.385514770213134e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(-4.5141999561417334e-1), PW_R(2.764150263500049e-17)}, PW_R(7.385514770213133e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(4.514199956141734e-1), PW_R(-2.7641502635000492e-17)}, PW_R(7.385514770213135e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(-4.514199956141734e-1), PW_R(2.7641502635000492e-17)}, PW_R(7.385514770213133e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(-5.5283005270000966e-17), PW_R(-4.514199956141734e-1)}, PW_R(7.385514770213133e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(5.5283005270000966e-17), PW_R(4.514199956141734e-1)}, PW_R(7.385514770213134e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(-5.528300527000096e-17), PW_R(-4.5141999561417334e-1)}, PW_R(7.385514770213133e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(5.528300527000096e-17), PW_R(4.5141999561417334e-1)}, PW_R(7.385514770213132e-1)},
    {{PW_R(-8.105725868475872e-1), PW_R(7.171999263359923e-17), PW_R(5.856381830543589e-1)}, PW_R(9.362833126156358e-1)},
    {{PW_R(8.105725868475872e-1), PW_R(-7.171999263359923e-17), PW_R(-5.856381830543589e-1)}, PW_R(9.362833126156358e-1)},
    {{PW_R(8.105725868475873e-1), PW_R(7.171999263359923e-17), PW_R(5.856381830543589e-1)}, PW_R(9.362833126156358e-1)},
    {{PW_R(-8.105725868475873e-1), PW_R(-7.171999263359923e-17), PW_R(-5.856381830543589e-1)}, PW_R(9.362833126156358e-1)},
    {{PW_R(3.139139913187519e-16), PW_R(-8.191520442889918e-1), PW_R(-5.735764363510462e-1)}, PW_R(1.9837964963044934e0)},
    {{PW_R(-3.139139913187519e-16), PW_R(8.191520442889918e-1), PW_R(5.735764363510462e-1)}, PW_R(1.9837964963044938e0)},
    {{PW_R(3.864690985573075e-1), PW_R(6.521662502231705e-1), PW_R(6.521662502231705e-1)}, PW_R(1.8578856398573924e0)},
    {{PW_R(-3.864690985573075e-1), PW_R(-6.521662502231705e-1), PW_R(-6.521662502231705e-1)}, PW_R(1.8578856398573922e0)},
    {{PW_R(-9.217181282491229e-1), PW_R(2.7425872097066806e-1), PW_R(-2.74258720970668e-1)}, PW_R(8.769368911190333e-1)},
    {{PW_R(9.217181282491229e-1), PW_R(-2.7425872097066806e-1), PW_R(2.74258720970668e-1)}, PW_R(8.769368911190333e-1)},
    {{PW_R(-9.217181282491228e-1), PW_R(-2.742587209706679e-1), PW_R(2.7425872097066817e-1)}, PW_R(8.769368911190333e-1)},
    {{PW_R(9.217181282491228e-1), PW_R(2.742587209706679e-1), PW_R(-2.7425872097066817e-1)}, PW_R(8.769368911190333e-1)},
    {{PW_R(3.8646909855730754e-1), PW_R(-6.521662502231707e-1), PW_R(-6.521662502231703e-1)}, PW_R(1.8578856398573922e0)},
    {{PW_R(-3.8646909855730754e-1), PW_R(6.521662502231707e-1), PW_R(6.521662502231703e-1)}, PW_R(1.8578856398573924e0)},
    {{PW_R(2.3543549348906395e-16), PW_R(5.735764363510462e-1), PW_R(8.191520442889917e-1)}, PW_R(1.9837964963044934e0)},
    {{PW_R(-2.3543549348906395e-16), PW_R(-5.735764363510462e-1), PW_R(-8.191520442889917e-1)}, PW_R(1.9837964963044932e0)},
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
