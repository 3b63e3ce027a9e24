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
#define PW_ENVELOPE_SLACK_NM PW_R(1.3857130425660929e-6)
#else
#define PW_ENVELOPE_SLACK_NM PW_R(1.385713042566093e-9)
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
#define PW_ONOFF_NOISE_FLOOR_NM PW_R(1.5358431001446132e-9)
static const pw_real pw_onoff_best_positive_nm[3] = {PW_R(1.2356396720424383e-1), PW_R(1.5358431001446131e0), PW_R(1.5358431001446131e0)}; /* roll, pitch, yaw */
static const pw_real pw_onoff_best_negative_nm[3] = {PW_R(1.2356396720424383e-1), PW_R(1.535843100144613e0), PW_R(1.5358431001446131e0)}; /* magnitudes */

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
    {"yaw-neg", {PW_R(0e0), PW_R(0e0), PW_R(-1.3857130425660928e0)}, PW_R(8.683396091399323e-3)}, /* 0 */
    {"yaw-pos", {PW_R(3.0814879110195774e-33), PW_R(1.6970090421153055e-16), PW_R(1.3857130425660928e0)}, PW_R(8.683396091399323e-3)}, /* 1 */
    {"pitch-pos", {PW_R(1.5407439555097887e-33), PW_R(1.3857130425660928e0), PW_R(-8.485045210576528e-17)}, PW_R(8.683396091399323e-3)}, /* 2 */
    {"pitch-neg", {PW_R(0e0), PW_R(-1.3857130425660928e0), PW_R(2.545513563172958e-16)}, PW_R(8.683396091399323e-3)}, /* 3 */
    {"roll-pos-a", {PW_R(6.301710929676065e-2), PW_R(8.722098861779848e-2), PW_R(-1.2456448104058553e-1)}, PW_R(3.960679383866247e-3)}, /* 4 */
    {"roll-pos-b", {PW_R(6.301710929676065e-2), PW_R(-8.722098861779845e-2), PW_R(1.2456448104058555e-1)}, PW_R(3.960679383866247e-3)}, /* 5 */
    {"roll-neg-a", {PW_R(-6.301710929676065e-2), PW_R(1.2456448104058553e-1), PW_R(-8.722098861779848e-2)}, PW_R(3.960679383866247e-3)}, /* 6 */
    {"roll-neg-b", {PW_R(-6.301710929676065e-2), PW_R(-1.2456448104058553e-1), PW_R(8.722098861779849e-2)}, PW_R(3.960679383866247e-3)}, /* 7 */
};

static const pw_onoff_entry pw_onoff[PW_ONOFF_ROWS] = {
    /* 0: command (-1, -1, -1), meets */
    {{-1, -1, -1}, UINT32_C(0x000000C9), {PW_R(-1.1884854979675928e-1), PW_R(-1.3067085064777868e0), PW_R(-1.3067085064777864e0)}, {PW_R(-3.3504932228818114e0), PW_R(3.3504932228818123e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 1: command (-1, -1, 0), meets */
    {{-1, -1, 0}, UINT32_C(0x00000048), {PW_R(-6.1781983602121913e-2), PW_R(-1.2364302427946148e0), PW_R(-8.551147059394987e-2)}, {PW_R(-8.734143073643129e-1), PW_R(2.236061992174459e0)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 2: command (-1, -1, 1), meets */
    {{-1, -1, 1}, UINT32_C(0x000000CA), {PW_R(-1.1884854979675928e-1), PW_R(-1.3067085064777866e0), PW_R(1.306708506477787e0)}, {PW_R(3.3504932228818127e0), PW_R(3.350493222881812e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 3: command (-1, 0, -1), meets */
    {{-1, 0, -1}, UINT32_C(0x00000041), {PW_R(-6.1781983602121913e-2), PW_R(1.2212303628233676e-1), PW_R(-1.4440647496709016e0)}, {PW_R(-4.356841201661162e0), PW_R(-1.247364902122389e0)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 4: command (-1, 0, 0), meets */
    {{-1, 0, 0}, UINT32_C(0x00000040), {PW_R(-6.301710929676065e-2), PW_R(1.2456448104058553e-1), PW_R(-8.722098861779848e-2)}, {PW_R(-8.908753273930344e-1), PW_R(-1.2723018230720906e0)}, PW_R(3.960679383866247e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 5: command (-1, 0, 1), meets */
    {{-1, 0, 1}, UINT32_C(0x00000042), {PW_R(-6.1781983602121913e-2), PW_R(1.2212303628233692e-1), PW_R(1.2730418084830013e0)}, {PW_R(2.6100125869325344e0), PW_R(-1.2473649021223894e0)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 6: command (-1, 1, -1), meets */
    {{-1, 1, -1}, UINT32_C(0x000000C5), {PW_R(-1.1884854979675928e-1), PW_R(1.3067085064777868e0), PW_R(-1.3067085064777868e0)}, {PW_R(-3.3504932228818123e0), PW_R(-3.350493222881812e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 7: command (-1, 1, 0), meets */
    {{-1, 1, 0}, UINT32_C(0x00000044), {PW_R(-6.1781983602121913e-2), PW_R(1.4806763153592881e0), PW_R(-8.551147059395019e-2)}, {PW_R(-8.734143073643138e-1), PW_R(-4.730791796419236e0)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 8: command (-1, 1, 1), meets */
    {{-1, 1, 1}, UINT32_C(0x000000C6), {PW_R(-1.1884854979675928e-1), PW_R(1.3067085064777868e0), PW_R(1.3067085064777868e0)}, {PW_R(3.3504932228818127e0), PW_R(-3.3504932228818127e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 9: command (0, -1, -1), meets */
    {{0, -1, -1}, UINT32_C(0x00000009), {PW_R(0e0), PW_R(-1.3585532790769514e0), PW_R(-1.3585532790769512e0)}, {PW_R(-3.4834268942968474e0), PW_R(3.483426894296848e0)}, PW_R(1.702640571477752e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 10: command (0, -1, 0), meets */
    {{0, -1, 0}, UINT32_C(0x00000008), {PW_R(0e0), PW_R(-1.3857130425660928e0), PW_R(2.545513563172958e-16)}, {PW_R(6.526877187899988e-16), PW_R(3.5530664528168474e0)}, PW_R(8.683396091399323e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 11: command (0, -1, 1), meets */
    {{0, -1, 1}, UINT32_C(0x0000000A), {PW_R(3.0210912197226862e-33), PW_R(-1.3585532790769512e0), PW_R(1.3585532790769517e0)}, {PW_R(3.4834268942968483e0), PW_R(3.4834268942968474e0)}, PW_R(1.702640571477752e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 12: command (0, 0, -1), meets */
    {{0, 0, -1}, UINT32_C(0x00000001), {PW_R(0e0), PW_R(0e0), PW_R(-1.3857130425660928e0)}, {PW_R(-3.5530664528168474e0), PW_R(0e0)}, PW_R(8.683396091399323e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 13: command (0, 0, 0), all_off */
    {{0, 0, 0}, UINT32_C(0x00000000), {PW_R(0e0), PW_R(0e0), PW_R(0e0)}, {PW_R(0e0), PW_R(0e0)}, PW_R(0e0), PW_ONOFF_ALL_OFF, PW_R(0e0)},
    /* 14: command (0, 0, 1), meets */
    {{0, 0, 1}, UINT32_C(0x00000002), {PW_R(3.0814879110195774e-33), PW_R(1.6970090421153055e-16), PW_R(1.3857130425660928e0)}, {PW_R(3.5530664528168474e0), PW_R(-4.3512514585999927e-16)}, PW_R(8.683396091399323e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 15: command (0, 1, -1), meets */
    {{0, 1, -1}, UINT32_C(0x00000005), {PW_R(1.5105456098613431e-33), PW_R(1.3585532790769514e0), PW_R(-1.3585532790769514e0)}, {PW_R(-3.483426894296848e0), PW_R(-3.483426894296848e0)}, PW_R(1.702640571477752e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 16: command (0, 1, 0), meets */
    {{0, 1, 0}, UINT32_C(0x00000004), {PW_R(1.5407439555097887e-33), PW_R(1.3857130425660928e0), PW_R(-8.485045210576528e-17)}, {PW_R(-2.1756257292999963e-16), PW_R(-3.5530664528168474e0)}, PW_R(8.683396091399323e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 17: command (0, 1, 1), meets */
    {{0, 1, 1}, UINT32_C(0x00000006), {PW_R(4.5316368295840295e-33), PW_R(1.3585532790769517e0), PW_R(1.3585532790769514e0)}, {PW_R(3.483426894296848e0), PW_R(-3.4834268942968483e0)}, PW_R(1.702640571477752e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 18: command (1, -1, -1), meets */
    {{1, -1, -1}, UINT32_C(0x00000039), {PW_R(1.1884854979675928e-1), PW_R(-1.3067085064777866e0), PW_R(-1.3067085064777866e0)}, {PW_R(-3.3504932228818114e0), PW_R(3.3504932228818123e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 19: command (1, -1, 0), meets */
    {{1, -1, 0}, UINT32_C(0x00000018), {PW_R(6.1781983602121913e-2), PW_R(-1.2730418084830013e0), PW_R(-1.2212303628233652e-1)}, {PW_R(-1.2473649021223883e0), PW_R(2.6100125869325344e0)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 20: command (1, -1, 1), meets */
    {{1, -1, 1}, UINT32_C(0x0000003A), {PW_R(1.1884854979675928e-1), PW_R(-1.3067085064777866e0), PW_R(1.3067085064777868e0)}, {PW_R(3.3504932228818127e0), PW_R(3.350493222881812e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 21: command (1, 0, -1), meets */
    {{1, 0, -1}, UINT32_C(0x00000011), {PW_R(6.1781983602121913e-2), PW_R(8.55114705939501e-2), PW_R(-1.4806763153592881e0)}, {PW_R(-4.730791796419236e0), PW_R(-8.734143073643136e-1)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 22: command (1, 0, 0), meets */
    {{1, 0, 0}, UINT32_C(0x00000010), {PW_R(6.301710929676065e-2), PW_R(8.722098861779848e-2), PW_R(-1.2456448104058553e-1)}, {PW_R(-1.2723018230720906e0), PW_R(-8.908753273930344e-1)}, PW_R(3.960679383866247e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 23: command (1, 0, 1), meets */
    {{1, 0, 1}, UINT32_C(0x00000012), {PW_R(6.1781983602121913e-2), PW_R(8.551147059395027e-2), PW_R(1.2364302427946148e0)}, {PW_R(2.236061992174459e0), PW_R(-8.73414307364314e-1)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 24: command (1, 1, -1), meets */
    {{1, 1, -1}, UINT32_C(0x00000035), {PW_R(1.1884854979675928e-1), PW_R(1.3067085064777868e0), PW_R(-1.3067085064777868e0)}, {PW_R(-3.3504932228818114e0), PW_R(-3.3504932228818127e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 25: command (1, 1, 0), meets */
    {{1, 1, 0}, UINT32_C(0x00000014), {PW_R(6.1781983602121913e-2), PW_R(1.4440647496709016e0), PW_R(-1.2212303628233684e-1)}, {PW_R(-1.2473649021223892e0), PW_R(-4.356841201661162e0)}, PW_R(1.239625353168977e-2), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 26: command (1, 1, 1), meets */
    {{1, 1, 1}, UINT32_C(0x00000036), {PW_R(1.1884854979675928e-1), PW_R(1.3067085064777868e0), PW_R(1.3067085064777868e0)}, {PW_R(3.3504932228818123e0), PW_R(-3.3504932228818127e0)}, PW_R(2.3846381570430585e-2), PW_ONOFF_MEETS, PW_R(0e0)},
};

static const pw_region pw_regions[PW_REGION_COUNT] = {
    /* 0: basic ports 0 2 4 */
    {{0, 2, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.4264693379501765e0), PW_R(-4.418832620928234e-17), PW_R(-7.216501319408662e-1)},
      {PW_R(-9.98824583457728e-1), PW_R(7.216501319408662e-1), PW_R(0e0)},
      {PW_R(1.5868706311024082e1), PW_R(-1.764406668583712e-32), PW_R(0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 1: basic ports 0 2 5 */
    {{0, 2, 5}, UINT32_C(0x00000010),
     {{PW_R(1.426469337950177e0), PW_R(-4.418832620928234e-17), PW_R(-7.216501319408662e-1)},
      {PW_R(9.988245834577275e-1), PW_R(7.216501319408662e-1), PW_R(0e0)},
      {PW_R(1.5868706311024082e1), PW_R(-1.764406668583712e-32), PW_R(0e0)}},
     {PW_R(-1.7978394835616818e-1), PW_R(-1.258860758880941e-1), PW_R(-1e0)}},
    /* 2: basic ports 0 2 6 */
    {{0, 2, 6}, UINT32_C(0x00000000),
     {{PW_R(9.988245834577277e-1), PW_R(-4.418832620928234e-17), PW_R(-7.216501319408662e-1)},
      {PW_R(1.4264693379501765e0), PW_R(7.216501319408662e-1), PW_R(0e0)},
      {PW_R(-1.5868706311024082e1), PW_R(1.764406668583712e-32), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 3: basic ports 0 2 7 */
    {{0, 2, 7}, UINT32_C(0x00000040),
     {{PW_R(-9.98824583457728e-1), PW_R(-4.418832620928234e-17), PW_R(-7.216501319408662e-1)},
      {PW_R(-1.4264693379501765e0), PW_R(7.216501319408662e-1), PW_R(-0e0)},
      {PW_R(-1.5868706311024082e1), PW_R(1.764406668583712e-32), PW_R(-0e0)}},
     {PW_R(-1.2588607588809414e-1), PW_R(-1.7978394835616815e-1), PW_R(-1e0)}},
    /* 4: basic ports 0 3 4 */
    {{0, 3, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.4264693379501763e0), PW_R(-1.3256497862784703e-16), PW_R(-7.216501319408662e-1)},
      {PW_R(9.98824583457728e-1), PW_R(-7.216501319408662e-1), PW_R(-0e0)},
      {PW_R(1.5868706311024082e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 5: basic ports 0 3 5 */
    {{0, 3, 5}, UINT32_C(0x00000010),
     {{PW_R(1.4264693379501767e0), PW_R(-1.3256497862784703e-16), PW_R(-7.216501319408662e-1)},
      {PW_R(-9.988245834577275e-1), PW_R(-7.216501319408662e-1), PW_R(-0e0)},
      {PW_R(1.5868706311024082e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(-1.7978394835616815e-1), PW_R(1.258860758880941e-1), PW_R(-1e0)}},
    /* 6: basic ports 0 3 6 */
    {{0, 3, 6}, UINT32_C(0x00000080),
     {{PW_R(9.988245834577276e-1), PW_R(-1.3256497862784703e-16), PW_R(-7.216501319408662e-1)},
      {PW_R(-1.4264693379501765e0), PW_R(-7.216501319408662e-1), PW_R(-0e0)},
      {PW_R(-1.5868706311024082e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(1.2588607588809408e-1), PW_R(-1.7978394835616815e-1), PW_R(-1e0)}},
    /* 7: basic ports 0 3 7 */
    {{0, 3, 7}, UINT32_C(0x00000000),
     {{PW_R(-9.988245834577277e-1), PW_R(-1.3256497862784703e-16), PW_R(-7.216501319408662e-1)},
      {PW_R(1.4264693379501765e0), PW_R(-7.216501319408662e-1), PW_R(0e0)},
      {PW_R(-1.5868706311024082e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(0e0)}},
    /* 8: basic ports 0 4 5 */
    {{0, 4, 5}, UINT32_C(0x00000008),
     {{PW_R(3.4164001152794677e-16), PW_R(-1.030623197496532e0), PW_R(-7.216501319408661e-1)},
      {PW_R(7.9343531555120395e0), PW_R(5.732565153451713e0), PW_R(0e0)},
      {PW_R(7.934353155512042e0), PW_R(-5.732565153451713e0), PW_R(0e0)}},
     {PW_R(-1.4281480067421144e0), PW_R(7.943690300497934e0), PW_R(-7.943690300497934e0)}},
    /* 9: basic ports 0 4 6 */
    {{0, 4, 6}, UINT32_C(0x00000004),
     {{PW_R(-4.2764475449244865e-1), PW_R(-7.216501319408661e-1), PW_R(-7.216501319408661e-1)},
      {PW_R(9.33339369129816e0), PW_R(4.721759248229015e0), PW_R(0e0)},
      {PW_R(-6.535312619725922e0), PW_R(4.721759248229015e0), PW_R(-0e0)}},
     {PW_R(9.999999999999999e-1), PW_R(-6.543003374128015e0), PW_R(-6.543003374128015e0)}},
    /* 10: basic ports 0 4 7 */
    {{0, 4, 7}, UINT32_C(0x00000028),
     {{PW_R(-2.425293921407904e0), PW_R(7.216501319408662e-1), PW_R(-7.216501319408665e-1)},
      {PW_R(5.293230595679392e1), PW_R(-2.6778427381093014e1), PW_R(0e0)},
      {PW_R(3.706359964576984e1), PW_R(-2.6778427381093014e1), PW_R(0e0)}},
     {PW_R(1.3056700242442625e0), PW_R(-4.2778497901007285e1), PW_R(-4.1778497901007285e1)}},
    /* 11: basic ports 0 5 6 */
    {{0, 5, 6}, UINT32_C(0x00000014),
     {{PW_R(2.425293921407904e0), PW_R(7.216501319408665e-1), PW_R(-7.216501319408665e-1)},
      {PW_R(5.2932305956793876e1), PW_R(2.6778427381092992e1), PW_R(0e0)},
      {PW_R(3.70635996457698e1), PW_R(2.6778427381092992e1), PW_R(0e0)}},
     {PW_R(-1.305670024244263e0), PW_R(-4.277849790100725e1), PW_R(-4.177849790100725e1)}},
    /* 12: basic ports 0 5 7 */
    {{0, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(4.2764475449244893e-1), PW_R(-7.216501319408664e-1), PW_R(-7.216501319408661e-1)},
      {PW_R(9.33339369129816e0), PW_R(-4.721759248229015e0), PW_R(0e0)},
      {PW_R(-6.535312619725921e0), PW_R(-4.721759248229015e0), PW_R(-0e0)}},
     {PW_R(-1e0), PW_R(-6.543003374128015e0), PW_R(-6.543003374128015e0)}},
    /* 13: basic ports 0 6 7 */
    {{0, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(-7.973963714197351e-17), PW_R(-5.053048623350264e-1), PW_R(-7.216501319408662e-1)},
      {PW_R(-7.934353155512041e0), PW_R(4.013985333725191e0), PW_R(-0e0)},
      {PW_R(-7.934353155512041e0), PW_R(-4.013985333725191e0), PW_R(-0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(0e0)}},
    /* 14: basic ports 1 2 4 */
    {{1, 2, 4}, UINT32_C(0x00000020),
     {{PW_R(1.4264693379501765e0), PW_R(4.418832620928234e-17), PW_R(7.216501319408662e-1)},
      {PW_R(-9.988245834577282e-1), PW_R(7.216501319408662e-1), PW_R(-8.837665241856469e-17)},
      {PW_R(1.5868706311024082e1), PW_R(-1.7644066685837122e-32), PW_R(-3.528813337167424e-32)}},
     {PW_R(-1.7978394835616818e-1), PW_R(1.2588607588809414e-1), PW_R(-1e0)}},
    /* 15: basic ports 1 2 5 */
    {{1, 2, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.426469337950177e0), PW_R(4.418832620928234e-17), PW_R(7.216501319408662e-1)},
      {PW_R(9.988245834577277e-1), PW_R(7.216501319408662e-1), PW_R(-8.837665241856469e-17)},
      {PW_R(1.5868706311024082e1), PW_R(-1.7644066685837122e-32), PW_R(-3.528813337167424e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 16: basic ports 1 2 6 */
    {{1, 2, 6}, UINT32_C(0x00000000),
     {{PW_R(-9.988245834577277e-1), PW_R(4.418832620928234e-17), PW_R(7.216501319408662e-1)},
      {PW_R(1.4264693379501767e0), PW_R(7.216501319408662e-1), PW_R(-8.837665241856469e-17)},
      {PW_R(-1.5868706311024082e1), PW_R(1.7644066685837122e-32), PW_R(3.528813337167424e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 17: basic ports 1 2 7 */
    {{1, 2, 7}, UINT32_C(0x00000040),
     {{PW_R(9.98824583457728e-1), PW_R(4.418832620928234e-17), PW_R(7.216501319408662e-1)},
      {PW_R(-1.4264693379501767e0), PW_R(7.216501319408662e-1), PW_R(-8.837665241856469e-17)},
      {PW_R(-1.5868706311024082e1), PW_R(1.7644066685837122e-32), PW_R(3.528813337167424e-32)}},
     {PW_R(1.2588607588809414e-1), PW_R(-1.7978394835616818e-1), PW_R(-1e0)}},
    /* 18: basic ports 1 3 4 */
    {{1, 3, 4}, UINT32_C(0x00000020),
     {{PW_R(1.4264693379501763e0), PW_R(1.3256497862784703e-16), PW_R(7.216501319408662e-1)},
      {PW_R(9.988245834577282e-1), PW_R(-7.216501319408662e-1), PW_R(8.837665241856469e-17)},
      {PW_R(1.5868706311024082e1), PW_R(-6.482324937225863e-48), PW_R(-3.528813337167424e-32)}},
     {PW_R(-1.7978394835616815e-1), PW_R(-1.2588607588809414e-1), PW_R(-1e0)}},
    /* 19: basic ports 1 3 5 */
    {{1, 3, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.4264693379501767e0), PW_R(1.3256497862784703e-16), PW_R(7.216501319408662e-1)},
      {PW_R(-9.988245834577277e-1), PW_R(-7.216501319408662e-1), PW_R(8.837665241856469e-17)},
      {PW_R(1.5868706311024082e1), PW_R(-6.482324937225863e-48), PW_R(-3.528813337167424e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 20: basic ports 1 3 6 */
    {{1, 3, 6}, UINT32_C(0x00000080),
     {{PW_R(-9.988245834577276e-1), PW_R(1.3256497862784703e-16), PW_R(7.216501319408662e-1)},
      {PW_R(-1.4264693379501767e0), PW_R(-7.216501319408662e-1), PW_R(8.837665241856469e-17)},
      {PW_R(-1.5868706311024082e1), PW_R(6.482324937225863e-48), PW_R(3.528813337167424e-32)}},
     {PW_R(-1.2588607588809408e-1), PW_R(-1.7978394835616818e-1), PW_R(-1e0)}},
    /* 21: basic ports 1 3 7 */
    {{1, 3, 7}, UINT32_C(0x00000000),
     {{PW_R(9.988245834577277e-1), PW_R(1.3256497862784703e-16), PW_R(7.216501319408662e-1)},
      {PW_R(1.4264693379501767e0), PW_R(-7.216501319408662e-1), PW_R(8.837665241856469e-17)},
      {PW_R(-1.5868706311024082e1), PW_R(6.482324937225863e-48), PW_R(3.528813337167424e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 22: basic ports 1 4 5 */
    {{1, 4, 5}, UINT32_C(0x00000004),
     {{PW_R(-3.416400115279467e-16), PW_R(1.0306231974965319e0), PW_R(7.216501319408659e-1)},
      {PW_R(7.9343531555120395e0), PW_R(5.732565153451712e0), PW_R(-7.020367566078294e-16)},
      {PW_R(7.934353155512042e0), PW_R(-5.732565153451712e0), PW_R(7.020367566078294e-16)}},
     {PW_R(-1.4281480067421144e0), PW_R(-7.9436903004979325e0), PW_R(7.9436903004979325e0)}},
    /* 23: basic ports 1 4 6 */
    {{1, 4, 6}, UINT32_C(0x00000004),
     {{PW_R(4.2764475449244854e-1), PW_R(7.21650131940866e-1), PW_R(7.21650131940866e-1)},
      {PW_R(9.33339369129816e0), PW_R(4.721759248229014e0), PW_R(-5.782487349688075e-16)},
      {PW_R(-6.535312619725923e0), PW_R(4.721759248229014e0), PW_R(-5.782487349688075e-16)}},
     {PW_R(-9.999999999999997e-1), PW_R(-6.543003374128014e0), PW_R(-6.543003374128014e0)}},
    /* 24: basic ports 1 4 7 */
    {{1, 4, 7}, UINT32_C(0x00000028),
     {{PW_R(2.425293921407904e0), PW_R(-7.216501319408662e-1), PW_R(7.216501319408665e-1)},
      {PW_R(5.293230595679393e1), PW_R(-2.6778427381093014e1), PW_R(3.27941153784554e-15)},
      {PW_R(3.706359964576985e1), PW_R(-2.6778427381093014e1), PW_R(3.27941153784554e-15)}},
     {PW_R(-1.3056700242442625e0), PW_R(-4.2778497901007285e1), PW_R(-4.1778497901007285e1)}},
    /* 25: basic ports 1 5 6 */
    {{1, 5, 6}, UINT32_C(0x00000014),
     {{PW_R(-2.425293921407904e0), PW_R(-7.216501319408665e-1), PW_R(7.216501319408665e-1)},
      {PW_R(5.293230595679389e1), PW_R(2.6778427381092992e1), PW_R(-3.2794115378455375e-15)},
      {PW_R(3.7063599645769806e1), PW_R(2.6778427381092992e1), PW_R(-3.2794115378455375e-15)}},
     {PW_R(1.305670024244263e0), PW_R(-4.277849790100725e1), PW_R(-4.177849790100725e1)}},
    /* 26: basic ports 1 5 7 */
    {{1, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(-4.2764475449244893e-1), PW_R(7.216501319408664e-1), PW_R(7.216501319408661e-1)},
      {PW_R(9.333393691298161e0), PW_R(-4.721759248229015e0), PW_R(5.782487349688076e-16)},
      {PW_R(-6.5353126197259215e0), PW_R(-4.721759248229015e0), PW_R(5.782487349688076e-16)}},
     {PW_R(1e0), PW_R(-6.543003374128015e0), PW_R(-6.543003374128015e0)}},
    /* 27: basic ports 1 6 7 */
    {{1, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(7.97396371419735e-17), PW_R(5.053048623350263e-1), PW_R(7.216501319408661e-1)},
      {PW_R(-7.934353155512041e0), PW_R(4.013985333725191e0), PW_R(-4.915714290770976e-16)},
      {PW_R(-7.934353155512041e0), PW_R(-4.013985333725191e0), PW_R(4.915714290770976e-16)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 28: basic ports 2 4 5 */
    {{2, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(-2.392189114259205e-16), PW_R(7.216501319408662e-1), PW_R(5.053048623350261e-1)},
      {PW_R(7.934353155512042e0), PW_R(-2.457857145385488e-16), PW_R(-4.013985333725191e0)},
      {PW_R(7.9343531555120395e0), PW_R(2.457857145385488e-16), PW_R(4.013985333725191e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 29: basic ports 2 4 6 */
    {{2, 4, 6}, UINT32_C(0x00000001),
     {{PW_R(4.2764475449244865e-1), PW_R(7.216501319408661e-1), PW_R(7.216501319408661e-1)},
      {PW_R(6.5353126197259215e0), PW_R(-2.891243674844038e-16), PW_R(-4.721759248229015e0)},
      {PW_R(-9.33339369129816e0), PW_R(-2.891243674844038e-16), PW_R(-4.721759248229015e0)}},
     {PW_R(1e0), PW_R(-6.543003374128015e0), PW_R(-6.543003374128015e0)}},
    /* 30: basic ports 2 4 7 */
    {{2, 4, 7}, UINT32_C(0x00000041),
     {{PW_R(-2.425293921407904e0), PW_R(7.216501319408662e-1), PW_R(-7.216501319408665e-1)},
      {PW_R(-3.706359964576984e1), PW_R(-1.63970576892277e-15), PW_R(-2.6778427381093014e1)},
      {PW_R(-5.293230595679392e1), PW_R(-1.63970576892277e-15), PW_R(-2.6778427381093014e1)}},
     {PW_R(-1.305670024244263e0), PW_R(-4.177849790100729e1), PW_R(-4.277849790100729e1)}},
    /* 31: basic ports 2 5 6 */
    {{2, 5, 6}, UINT32_C(0x00000082),
     {{PW_R(2.425293921407903e0), PW_R(7.21650131940866e-1), PW_R(-7.21650131940866e-1)},
      {PW_R(-3.7063599645769784e1), PW_R(1.6397057689227678e-15), PW_R(2.677842738109298e1)},
      {PW_R(-5.293230595679387e1), PW_R(1.6397057689227678e-15), PW_R(2.677842738109298e1)}},
     {PW_R(1.3056700242442618e0), PW_R(-4.177849790100723e1), PW_R(-4.277849790100723e1)}},
    /* 32: basic ports 2 5 7 */
    {{2, 5, 7}, UINT32_C(0x00000002),
     {{PW_R(-4.276447544924488e-1), PW_R(7.216501319408662e-1), PW_R(7.21650131940866e-1)},
      {PW_R(6.5353126197259215e0), PW_R(2.8912436748440373e-16), PW_R(4.721759248229014e0)},
      {PW_R(-9.333393691298161e0), PW_R(2.8912436748440373e-16), PW_R(4.721759248229014e0)}},
     {PW_R(-9.999999999999999e-1), PW_R(-6.543003374128014e0), PW_R(-6.543003374128014e0)}},
    /* 33: basic ports 2 6 7 */
    {{2, 6, 7}, UINT32_C(0x00000002),
     {{PW_R(1.1388000384264894e-16), PW_R(7.216501319408664e-1), PW_R(1.0306231974965319e0)},
      {PW_R(-7.934353155512042e0), PW_R(-3.5101837830391477e-16), PW_R(-5.732565153451713e0)},
      {PW_R(-7.934353155512041e0), PW_R(3.5101837830391477e-16), PW_R(5.732565153451713e0)}},
     {PW_R(-1.4281480067421146e0), PW_R(7.943690300497934e0), PW_R(-7.943690300497934e0)}},
    /* 34: basic ports 3 4 5 */
    {{3, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(2.3921891142592054e-16), PW_R(-7.216501319408664e-1), PW_R(-5.053048623350261e-1)},
      {PW_R(7.934353155512042e0), PW_R(-7.373571436156464e-16), PW_R(-4.013985333725191e0)},
      {PW_R(7.9343531555120395e0), PW_R(7.373571436156464e-16), PW_R(4.013985333725191e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 35: basic ports 3 4 6 */
    {{3, 4, 6}, UINT32_C(0x00000001),
     {{PW_R(-4.276447544924487e-1), PW_R(-7.216501319408664e-1), PW_R(-7.216501319408664e-1)},
      {PW_R(6.535312619725922e0), PW_R(-8.673731024532114e-16), PW_R(-4.721759248229016e0)},
      {PW_R(-9.333393691298161e0), PW_R(-8.673731024532114e-16), PW_R(-4.721759248229016e0)}},
     {PW_R(-1.0000000000000002e0), PW_R(-6.543003374128016e0), PW_R(-6.543003374128016e0)}},
    /* 36: basic ports 3 4 7 */
    {{3, 4, 7}, UINT32_C(0x00000041),
     {{PW_R(2.4252939214079046e0), PW_R(-7.216501319408664e-1), PW_R(7.216501319408667e-1)},
      {PW_R(-3.706359964576985e1), PW_R(-4.919117306768311e-15), PW_R(-2.677842738109302e1)},
      {PW_R(-5.2932305956793925e1), PW_R(-4.919117306768311e-15), PW_R(-2.677842738109302e1)}},
     {PW_R(1.3056700242442631e0), PW_R(-4.17784979010073e1), PW_R(-4.27784979010073e1)}},
    /* 37: basic ports 3 5 6 */
    {{3, 5, 6}, UINT32_C(0x00000082),
     {{PW_R(-2.4252939214079037e0), PW_R(-7.216501319408662e-1), PW_R(7.216501319408662e-1)},
      {PW_R(-3.706359964576979e1), PW_R(4.919117306768304e-15), PW_R(2.6778427381092985e1)},
      {PW_R(-5.2932305956793876e1), PW_R(4.919117306768304e-15), PW_R(2.6778427381092985e1)}},
     {PW_R(-1.3056700242442623e0), PW_R(-4.177849790100724e1), PW_R(-4.277849790100724e1)}},
    /* 38: basic ports 3 5 7 */
    {{3, 5, 7}, UINT32_C(0x00000002),
     {{PW_R(4.2764475449244893e-1), PW_R(-7.216501319408664e-1), PW_R(-7.216501319408661e-1)},
      {PW_R(6.5353126197259215e0), PW_R(8.673731024532112e-16), PW_R(4.721759248229015e0)},
      {PW_R(-9.333393691298161e0), PW_R(8.673731024532112e-16), PW_R(4.721759248229015e0)}},
     {PW_R(1.0000000000000002e0), PW_R(-6.543003374128015e0), PW_R(-6.543003374128015e0)}},
    /* 39: basic ports 3 6 7 */
    {{3, 6, 7}, UINT32_C(0x00000001),
     {{PW_R(-1.1388000384264894e-16), PW_R(-7.216501319408664e-1), PW_R(-1.0306231974965319e0)},
      {PW_R(-7.934353155512041e0), PW_R(-1.0530551349117443e-15), PW_R(-5.732565153451713e0)},
      {PW_R(-7.93435315551204e0), PW_R(1.0530551349117443e-15), PW_R(5.732565153451713e0)}},
     {PW_R(-1.4281480067421144e0), PW_R(-7.943690300497934e0), PW_R(7.943690300497934e0)}},
    /* 40: basic ports 4 5 6 */
    {{4, 5, 6}, UINT32_C(0x00000006),
     {{PW_R(7.9343531555120395e0), PW_R(2.3608796241145074e0), PW_R(-2.3608796241145074e0)},
      {PW_R(7.934353155512034e0), PW_R(1.3389213690546493e1), PW_R(1.3389213690546493e1)},
      {PW_R(-5.220978990825722e-15), PW_R(1.5750093314661003e1), PW_R(1.1028334066431986e1)}},
     {PW_R(-4.440892098500626e-16), PW_R(-3.710721608138954e1), PW_R(-3.710721608138954e1)}},
    /* 41: basic ports 4 5 7 */
    {{4, 5, 7}, UINT32_C(0x00000009),
     {{PW_R(7.9343531555120475e0), PW_R(-1.338921369054651e1), PW_R(-1.3389213690546507e1)},
      {PW_R(7.93435315551204e0), PW_R(-2.3608796241145074e0), PW_R(2.3608796241145082e0)},
      {PW_R(5.2209789908257276e-15), PW_R(-1.575009331466102e1), PW_R(-1.1028334066431999e1)}},
     {PW_R(-3.710721608138957e1), PW_R(4.440892098500626e-16), PW_R(-3.710721608138957e1)}},
    /* 42: basic ports 4 6 7 */
    {{4, 6, 7}, UINT32_C(0x00000009),
     {{PW_R(-1.7403263302752425e-15), PW_R(-1.1028334066432002e1), PW_R(-1.5750093314661017e1)},
      {PW_R(-7.93435315551204e0), PW_R(2.3608796241145074e0), PW_R(-2.3608796241145082e0)},
      {PW_R(-7.934353155512042e0), PW_R(-1.3389213690546507e1), PW_R(-1.3389213690546507e1)}},
     {PW_R(-3.710721608138957e1), PW_R(-4.440892098500626e-16), PW_R(-3.7107216081389566e1)}},
    /* 43: basic ports 5 6 7 */
    {{5, 6, 7}, UINT32_C(0x00000006),
     {{PW_R(1.7403263302752406e-15), PW_R(1.102833406643199e1), PW_R(1.5750093314661e1)},
      {PW_R(-7.9343531555120395e0), PW_R(1.3389213690546496e1), PW_R(1.3389213690546493e1)},
      {PW_R(-7.9343531555120395e0), PW_R(-2.3608796241145074e0), PW_R(2.3608796241145074e0)}},
     {PW_R(-3.710721608138954e1), PW_R(-3.710721608138954e1), PW_R(4.440892098500626e-16)}},
};

static const pw_facet pw_facets[PW_FACET_COUNT] = {
    {{PW_R(1e0), PW_R(-5.559390393903657e-34), PW_R(-1.111878078780731e-33)}, PW_R(1.260342185935213e-1)},
    {{PW_R(-1e0), PW_R(5.559390393903657e-34), PW_R(1.111878078780731e-33)}, PW_R(1.260342185935213e-1)},
    {{PW_R(8.105725868475873e-1), PW_R(-5.856381830543589e-1), PW_R(3.585999631679961e-17)}, PW_R(9.355561261311841e-1)},
    {{PW_R(-8.105725868475873e-1), PW_R(5.856381830543589e-1), PW_R(-3.585999631679961e-17)}, PW_R(9.355561261311842e-1)},
    {{PW_R(-8.10572586847587e-1), PW_R(-5.85638183054359e-1), PW_R(3.585999631679962e-17)}, PW_R(9.355561261311843e-1)},
    {{PW_R(8.10572586847587e-1), PW_R(5.85638183054359e-1), PW_R(-3.585999631679962e-17)}, PW_R(9.355561261311844e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(4.5141999561417334e-1), PW_R(-2.764150263500048e-17)}, PW_R(7.380003705677344e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(-4.5141999561417334e-1), PW_R(2.764150263500048e-17)}, PW_R(7.380003705677343e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(4.5141999561417334e-1), PW_R(-2.764150263500048e-17)}, PW_R(7.380003705677344e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(-4.5141999561417334e-1), PW_R(2.764150263500048e-17)}, PW_R(7.380003705677342e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(-5.5283005270000966e-17), PW_R(-4.514199956141734e-1)}, PW_R(7.380003705677343e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(5.5283005270000966e-17), PW_R(4.514199956141734e-1)}, PW_R(7.380003705677344e-1)},
    {{PW_R(8.92311597795131e-1), PW_R(-5.528300527000096e-17), PW_R(-4.5141999561417334e-1)}, PW_R(7.380003705677343e-1)},
    {{PW_R(-8.92311597795131e-1), PW_R(5.528300527000096e-17), PW_R(4.5141999561417334e-1)}, PW_R(7.380003705677343e-1)},
    {{PW_R(-8.105725868475872e-1), PW_R(7.171999263359923e-17), PW_R(5.856381830543589e-1)}, PW_R(9.355561261311841e-1)},
    {{PW_R(8.105725868475872e-1), PW_R(-7.171999263359923e-17), PW_R(-5.856381830543589e-1)}, PW_R(9.355561261311841e-1)},
    {{PW_R(8.105725868475873e-1), PW_R(7.171999263359923e-17), PW_R(5.856381830543589e-1)}, PW_R(9.355561261311841e-1)},
    {{PW_R(-8.105725868475873e-1), PW_R(-7.171999263359923e-17), PW_R(-5.856381830543589e-1)}, PW_R(9.355561261311841e-1)},
    {{PW_R(3.139139913187519e-16), PW_R(-8.191520442889918e-1), PW_R(-5.735764363510462e-1)}, PW_R(1.9819313658399393e0)},
    {{PW_R(-3.139139913187519e-16), PW_R(8.191520442889918e-1), PW_R(5.735764363510462e-1)}, PW_R(1.9819313658399398e0)},
    {{PW_R(3.864690985573075e-1), PW_R(6.521662502231705e-1), PW_R(6.521662502231705e-1)}, PW_R(1.856138888558552e0)},
    {{PW_R(-3.864690985573075e-1), PW_R(-6.521662502231705e-1), PW_R(-6.521662502231705e-1)}, PW_R(1.8561388885585517e0)},
    {{PW_R(-9.217181282491227e-1), PW_R(2.74258720970668e-1), PW_R(-2.742587209706681e-1)}, PW_R(8.762557974304603e-1)},
    {{PW_R(9.217181282491227e-1), PW_R(-2.74258720970668e-1), PW_R(2.742587209706681e-1)}, PW_R(8.762557974304603e-1)},
    {{PW_R(-9.217181282491228e-1), PW_R(-2.742587209706679e-1), PW_R(2.7425872097066817e-1)}, PW_R(8.762557974304603e-1)},
    {{PW_R(9.217181282491228e-1), PW_R(2.742587209706679e-1), PW_R(-2.7425872097066817e-1)}, PW_R(8.762557974304603e-1)},
    {{PW_R(3.8646909855730766e-1), PW_R(-6.521662502231705e-1), PW_R(-6.521662502231704e-1)}, PW_R(1.8561388885585512e0)},
    {{PW_R(-3.8646909855730766e-1), PW_R(6.521662502231705e-1), PW_R(6.521662502231704e-1)}, PW_R(1.856138888558552e0)},
    {{PW_R(7.847849782968798e-17), PW_R(5.735764363510462e-1), PW_R(8.191520442889917e-1)}, PW_R(1.9819313658399396e0)},
    {{PW_R(-7.847849782968798e-17), PW_R(-5.735764363510462e-1), PW_R(-8.191520442889917e-1)}, PW_R(1.9819313658399393e0)},
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
