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
#define PW_ENVELOPE_SLACK_NM PW_R(4.4972342634408264e-7)
#else
#define PW_ENVELOPE_SLACK_NM PW_R(4.497234263440827e-10)
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
#define PW_ONOFF_NOISE_FLOOR_NM PW_R(4.564343913190859e-10)
static const pw_real pw_onoff_best_positive_nm[3] = {PW_R(4.4870493652535294e-2), PW_R(4.497234263440827e-1), PW_R(4.5643439131908586e-1)}; /* roll, pitch, yaw */
static const pw_real pw_onoff_best_negative_nm[3] = {PW_R(4.4870493652535294e-2), PW_R(4.497234263440827e-1), PW_R(4.5643439131908586e-1)}; /* magnitudes */

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
    {"yaw-neg", {PW_R(0e0), PW_R(0e0), PW_R(-4.497234263440827e-1)}, PW_R(2.437932223851635e-3)}, /* 0 */
    {"pitch-pos", {PW_R(3.851859888774472e-34), PW_R(4.497234263440827e-1), PW_R(-2.7537617728693066e-17)}, PW_R(2.437932223851635e-3)}, /* 1 */
    {"yaw-pos", {PW_R(7.703719777548943e-34), PW_R(5.507523545738613e-17), PW_R(4.497234263440827e-1)}, PW_R(2.437932223851635e-3)}, /* 2 */
    {"pitch-neg", {PW_R(0e0), PW_R(-4.497234263440827e-1), PW_R(8.261285318607919e-17)}, PW_R(2.437932223851635e-3)}, /* 3 */
    {"roll-pos-a", {PW_R(2.2701988701308268e-2), PW_R(2.8408571088338946e-3), PW_R(1.0602223067211322e-2)}, PW_R(1.9587410553291605e-3)}, /* 4 */
    {"roll-pos-b", {PW_R(2.270198870130827e-2), PW_R(-2.8408571088338946e-3), PW_R(-1.0602223067211324e-2)}, PW_R(1.9587410553291605e-3)}, /* 5 */
    {"roll-neg-a", {PW_R(-2.270198870130827e-2), PW_R(2.840857108833893e-3), PW_R(-1.0602223067211324e-2)}, PW_R(1.9587410553291605e-3)}, /* 6 */
    {"roll-neg-b", {PW_R(-2.2701988701308268e-2), PW_R(-2.8408571088338916e-3), PW_R(1.0602223067211324e-2)}, PW_R(1.9587410553291605e-3)}, /* 7 */
};

static const pw_onoff_entry pw_onoff[PW_ONOFF_ROWS] = {
    /* 0: command (-1, -1, -1), meets */
    {{-1, -1, -1}, UINT32_C(0x000000C9), {PW_R(-4.2847909700547894e-2), PW_R(-4.244057429449294e-1), PW_R(-4.2440574294492933e-1)}, {PW_R(-1.0918743870230088e0), PW_R(1.091874387023009e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 1: command (-1, -1, 0), meets */
    {{-1, -1, 0}, UINT32_C(0x00000048), {PW_R(-2.243524682626765e-2), PW_R(-4.4163182684394847e-1), PW_R(-1.0477649978141565e-2)}, {PW_R(9.26787641903941e-1), PW_R(1.3917470021177467e0)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 2: command (-1, -1, 1), meets */
    {{-1, -1, 1}, UINT32_C(0x000000CC), {PW_R(-4.2847909700547894e-2), PW_R(-4.2440574294492933e-1), PW_R(4.2440574294492944e-1)}, {PW_R(1.091874387023009e0), PW_R(1.091874387023009e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 3: command (-1, 0, -1), meets */
    {{-1, 0, -1}, UINT32_C(0x00000041), {PW_R(-2.243524682626765e-2), PW_R(2.807477850219023e-3), PW_R(-4.5491695467230914e-1)}, {PW_R(-2.1662736001050084e-1), PW_R(2.483320002033053e-1)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 4: command (-1, 0, 0), meets */
    {{-1, 0, 0}, UINT32_C(0x00000040), {PW_R(-2.270198870130827e-2), PW_R(2.840857108833893e-3), PW_R(-1.0602223067211324e-2)}, {PW_R(9.378066012797962e-1), PW_R(2.512845214694971e-1)}, PW_R(1.9587410553291605e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 5: command (-1, 0, 1), meets */
    {{-1, 0, 1}, UINT32_C(0x00000044), {PW_R(-2.243524682626765e-2), PW_R(2.807477850219077e-3), PW_R(4.339616547160259e-1)}, {PW_R(2.0702026438183827e0), PW_R(2.4833200020330512e-1)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 6: command (-1, 1, -1), meets */
    {{-1, 1, -1}, UINT32_C(0x000000C3), {PW_R(-4.2847909700547894e-2), PW_R(4.244057429449294e-1), PW_R(-4.244057429449294e-1)}, {PW_R(-1.091874387023009e0), PW_R(-1.091874387023009e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 7: command (-1, 1, 0), meets */
    {{-1, 1, 0}, UINT32_C(0x00000042), {PW_R(-2.243524682626765e-2), PW_R(4.4724678254438655e-1), PW_R(-1.0477649978141676e-2)}, {PW_R(9.267876419039407e-1), PW_R(-8.950830017111363e-1)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 8: command (-1, 1, 1), meets */
    {{-1, 1, 1}, UINT32_C(0x000000C6), {PW_R(-4.2847909700547894e-2), PW_R(4.2440574294492944e-1), PW_R(4.244057429449294e-1)}, {PW_R(1.091874387023009e0), PW_R(-1.091874387023009e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 9: command (0, -1, -1), meets */
    {{0, -1, -1}, UINT32_C(0x00000009), {PW_R(0e0), PW_R(-4.444393046941675e-1), PW_R(-4.444393046941674e-1)}, {PW_R(-1.1434150019144413e0), PW_R(1.1434150019144416e0)}, PW_R(4.818574434817777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 10: command (0, -1, 0), meets */
    {{0, -1, 0}, UINT32_C(0x00000008), {PW_R(0e0), PW_R(-4.497234263440827e-1), PW_R(8.261285318607919e-17)}, {PW_R(2.1253920318527999e-16), PW_R(1.157009533052077e0)}, PW_R(2.437932223851635e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 11: command (0, -1, 1), meets */
    {{0, -1, 1}, UINT32_C(0x0000000C), {PW_R(7.613203273233509e-34), PW_R(-4.444393046941674e-1), PW_R(4.4443930469416754e-1)}, {PW_R(1.1434150019144418e0), PW_R(1.1434150019144413e0)}, PW_R(4.818574434817777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 12: command (0, 0, -1), meets */
    {{0, 0, -1}, UINT32_C(0x00000001), {PW_R(0e0), PW_R(0e0), PW_R(-4.497234263440827e-1)}, {PW_R(-1.157009533052077e0), PW_R(0e0)}, PW_R(2.437932223851635e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 13: command (0, 0, 0), all_off */
    {{0, 0, 0}, UINT32_C(0x00000000), {PW_R(0e0), PW_R(0e0), PW_R(0e0)}, {PW_R(0e0), PW_R(0e0)}, PW_R(0e0), PW_ONOFF_ALL_OFF, PW_R(0e0)},
    /* 14: command (0, 0, 1), meets */
    {{0, 0, 1}, UINT32_C(0x00000004), {PW_R(7.703719777548943e-34), PW_R(5.507523545738613e-17), PW_R(4.497234263440827e-1)}, {PW_R(1.157009533052077e0), PW_R(-1.4169280212352e-16)}, PW_R(2.437932223851635e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 15: command (0, 1, -1), meets */
    {{0, 1, -1}, UINT32_C(0x00000003), {PW_R(3.8066016366167544e-34), PW_R(4.444393046941675e-1), PW_R(-4.444393046941675e-1)}, {PW_R(-1.1434150019144416e0), PW_R(-1.1434150019144416e0)}, PW_R(4.818574434817777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 16: command (0, 1, 0), meets */
    {{0, 1, 0}, UINT32_C(0x00000002), {PW_R(3.851859888774472e-34), PW_R(4.497234263440827e-1), PW_R(-2.7537617728693066e-17)}, {PW_R(-7.084640106176e-17), PW_R(-1.157009533052077e0)}, PW_R(2.437932223851635e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 17: command (0, 1, 1), meets */
    {{0, 1, 1}, UINT32_C(0x00000006), {PW_R(1.1419804909850264e-33), PW_R(4.4443930469416754e-1), PW_R(4.444393046941675e-1)}, {PW_R(1.1434150019144416e0), PW_R(-1.1434150019144418e0)}, PW_R(4.818574434817777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 18: command (1, -1, -1), meets */
    {{1, -1, -1}, UINT32_C(0x00000039), {PW_R(4.2847909700547894e-2), PW_R(-4.244057429449294e-1), PW_R(-4.2440574294492933e-1)}, {PW_R(-1.0918743870230085e0), PW_R(1.091874387023009e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 19: command (1, -1, 0), meets */
    {{1, -1, 0}, UINT32_C(0x00000018), {PW_R(2.2435246826267647e-2), PW_R(-4.4163182684394847e-1), PW_R(1.0477649978141728e-2)}, {PW_R(-9.267876419039405e-1), PW_R(1.391747002117747e0)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 20: command (1, -1, 1), meets */
    {{1, -1, 1}, UINT32_C(0x0000003C), {PW_R(4.2847909700547894e-2), PW_R(-4.2440574294492933e-1), PW_R(4.2440574294492944e-1)}, {PW_R(1.0918743870230094e0), PW_R(1.0918743870230088e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 21: command (1, 0, -1), meets */
    {{1, 0, -1}, UINT32_C(0x00000011), {PW_R(2.2435246826267647e-2), PW_R(2.8074778502190246e-3), PW_R(-4.339616547160259e-1)}, {PW_R(-2.0702026438183827e0), PW_R(2.4833200020330545e-1)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 22: command (1, 0, 0), meets */
    {{1, 0, 0}, UINT32_C(0x00000010), {PW_R(2.2701988701308268e-2), PW_R(2.8408571088338946e-3), PW_R(1.0602223067211322e-2)}, {PW_R(-9.378066012797961e-1), PW_R(2.5128452146949726e-1)}, PW_R(1.9587410553291605e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 23: command (1, 0, 1), meets */
    {{1, 0, 1}, UINT32_C(0x00000014), {PW_R(2.2435246826267647e-2), PW_R(2.807477850219079e-3), PW_R(4.5491695467230914e-1)}, {PW_R(2.1662736001050095e-1), PW_R(2.483320002033053e-1)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 24: command (1, 1, -1), meets */
    {{1, 1, -1}, UINT32_C(0x00000033), {PW_R(4.2847909700547894e-2), PW_R(4.244057429449294e-1), PW_R(-4.244057429449294e-1)}, {PW_R(-1.091874387023009e0), PW_R(-1.091874387023009e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 25: command (1, 1, 0), meets */
    {{1, 1, 0}, UINT32_C(0x00000012), {PW_R(2.2435246826267647e-2), PW_R(4.4724678254438655e-1), PW_R(1.0477649978141618e-2)}, {PW_R(-9.267876419039408e-1), PW_R(-8.950830017111362e-1)}, PW_R(4.345013625488777e-3), PW_ONOFF_MEETS, PW_R(0e0)},
    /* 26: command (1, 1, 1), meets */
    {{1, 1, 1}, UINT32_C(0x00000036), {PW_R(4.2847909700547894e-2), PW_R(4.2440574294492944e-1), PW_R(4.244057429449294e-1)}, {PW_R(1.091874387023009e0), PW_R(-1.0918743870230092e0)}, PW_R(8.298315276594869e-3), PW_ONOFF_MEETS, PW_R(0e0)},
};

static const pw_region pw_regions[PW_REGION_COUNT] = {
    /* 0: basic ports 0 1 4 */
    {{0, 1, 4}, UINT32_C(0x00000020),
     {{PW_R(1.0384546214189756e0), PW_R(-1.36155548878432e-16), PW_R(-2.223588857999364e0)},
      {PW_R(-2.782530771855818e-1), PW_R(2.223588857999364e0), PW_R(0e0)},
      {PW_R(4.404900439151272e1), PW_R(-3.7727764047208804e-32), PW_R(0e0)}},
     {PW_R(-4.714997016454989e-2), PW_R(1.263379642874267e-2), PW_R(-1.0000000000000002e0)}},
    /* 1: basic ports 0 1 5 */
    {{0, 1, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.0384546214189756e0), PW_R(-1.36155548878432e-16), PW_R(-2.223588857999364e0)},
      {PW_R(2.7825307718558173e-1), PW_R(2.223588857999364e0), PW_R(0e0)},
      {PW_R(4.404900439151271e1), PW_R(-3.77277640472088e-32), PW_R(0e0)}},
     {PW_R(0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 2: basic ports 0 1 6 */
    {{0, 1, 6}, UINT32_C(0x00000000),
     {{PW_R(1.0384546214189756e0), PW_R(-1.36155548878432e-16), PW_R(-2.223588857999364e0)},
      {PW_R(2.7825307718558157e-1), PW_R(2.223588857999364e0), PW_R(0e0)},
      {PW_R(-4.404900439151271e1), PW_R(3.77277640472088e-32), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 3: basic ports 0 1 7 */
    {{0, 1, 7}, UINT32_C(0x00000040),
     {{PW_R(-1.0384546214189758e0), PW_R(-1.36155548878432e-16), PW_R(-2.223588857999364e0)},
      {PW_R(-2.782530771855815e-1), PW_R(2.223588857999364e0), PW_R(-0e0)},
      {PW_R(-4.404900439151272e1), PW_R(3.7727764047208804e-32), PW_R(-0e0)}},
     {PW_R(-4.714997016454989e-2), PW_R(-1.2633796428742659e-2), PW_R(-1.0000000000000002e0)}},
    /* 4: basic ports 0 3 4 */
    {{0, 3, 4}, UINT32_C(0x00000020),
     {{PW_R(1.0384546214189756e0), PW_R(-4.0846664663529596e-16), PW_R(-2.223588857999364e0)},
      {PW_R(2.782530771855818e-1), PW_R(-2.223588857999364e0), PW_R(-0e0)},
      {PW_R(4.404900439151272e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(-4.714997016454989e-2), PW_R(-1.263379642874267e-2), PW_R(-1.0000000000000002e0)}},
    /* 5: basic ports 0 3 5 */
    {{0, 3, 5}, UINT32_C(0x00000000),
     {{PW_R(-1.0384546214189756e0), PW_R(-4.0846664663529586e-16), PW_R(-2.223588857999364e0)},
      {PW_R(-2.7825307718558173e-1), PW_R(-2.223588857999364e0), PW_R(-0e0)},
      {PW_R(4.404900439151271e1), PW_R(0e0), PW_R(0e0)}},
     {PW_R(0e0), PW_R(0e0), PW_R(-0e0)}},
    /* 6: basic ports 0 3 6 */
    {{0, 3, 6}, UINT32_C(0x00000000),
     {{PW_R(1.0384546214189756e0), PW_R(-4.0846664663529586e-16), PW_R(-2.223588857999364e0)},
      {PW_R(-2.7825307718558157e-1), PW_R(-2.223588857999364e0), PW_R(-0e0)},
      {PW_R(-4.404900439151271e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-0e0), PW_R(0e0), PW_R(0e0)}},
    /* 7: basic ports 0 3 7 */
    {{0, 3, 7}, UINT32_C(0x00000040),
     {{PW_R(-1.0384546214189758e0), PW_R(-4.0846664663529596e-16), PW_R(-2.223588857999364e0)},
      {PW_R(2.782530771855815e-1), PW_R(-2.223588857999364e0), PW_R(0e0)},
      {PW_R(-4.404900439151272e1), PW_R(-0e0), PW_R(-0e0)}},
     {PW_R(-4.714997016454989e-2), PW_R(1.2633796428742659e-2), PW_R(-1.0000000000000002e0)}},
    /* 8: basic ports 0 4 5 */
    {{0, 4, 5}, UINT32_C(0x00000002),
     {{PW_R(-1.1681577403074057e-16), PW_R(8.298546593197687e0), PW_R(-2.2235888579993643e0)},
      {PW_R(2.202450219575636e1), PW_R(1.7600322045244943e2), PW_R(0e0)},
      {PW_R(2.202450219575636e1), PW_R(-1.760032204524494e2), PW_R(0e0)}},
     {PW_R(-3.732050807568878e0), PW_R(-7.915277134946848e1), PW_R(7.915277134946848e1)}},
    /* 9: basic ports 0 4 6 */
    {{0, 4, 6}, UINT32_C(0x00000002),
     {{PW_R(1.0384546214189758e0), PW_R(-4.672630961229624e-16), PW_R(-2.2235888579993643e0)},
      {PW_R(2.202450219575635e1), PW_R(1.7600322045244948e2), PW_R(0e0)},
      {PW_R(-2.2024502195756362e1), PW_R(1.7600322045244943e2), PW_R(-0e0)}},
     {PW_R(1.4890682063519545e-16), PW_R(-7.915277134946851e1), PW_R(-7.915277134946848e1)}},
    /* 10: basic ports 0 5 7 */
    {{0, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(-1.0384546214189758e0), PW_R(-4.672630961229625e-16), PW_R(-2.2235888579993643e0)},
      {PW_R(2.2024502195756344e1), PW_R(-1.7600322045244948e2), PW_R(0e0)},
      {PW_R(-2.202450219575637e1), PW_R(-1.760032204524495e2), PW_R(-0e0)}},
     {PW_R(-2.6442140720460182e-17), PW_R(-7.915277134946851e1), PW_R(-7.915277134946852e1)}},
    /* 11: basic ports 0 6 7 */
    {{0, 6, 7}, UINT32_C(0x00000008),
     {{PW_R(-2.336315480614813e-16), PW_R(-8.298546593197692e0), PW_R(-2.223588857999364e0)},
      {PW_R(-2.202450219575635e1), PW_R(1.760032204524495e2), PW_R(-0e0)},
      {PW_R(-2.2024502195756362e1), PW_R(-1.7600322045244954e2), PW_R(-0e0)}},
     {PW_R(-3.7320508075688803e0), PW_R(7.915277134946852e1), PW_R(-7.915277134946854e1)}},
    /* 12: basic ports 1 2 4 */
    {{1, 2, 4}, UINT32_C(0x00000000),
     {{PW_R(-2.782530771855816e-1), PW_R(2.223588857999364e0), PW_R(-2.72311097756864e-16)},
      {PW_R(-1.0384546214189756e0), PW_R(1.36155548878432e-16), PW_R(2.223588857999364e0)},
      {PW_R(4.404900439151272e1), PW_R(-3.772776404720881e-32), PW_R(-7.545552809441761e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 13: basic ports 1 2 5 */
    {{1, 2, 5}, UINT32_C(0x00000010),
     {{PW_R(2.7825307718558157e-1), PW_R(2.223588857999364e0), PW_R(-2.72311097756864e-16)},
      {PW_R(1.0384546214189756e0), PW_R(1.36155548878432e-16), PW_R(2.223588857999364e0)},
      {PW_R(4.404900439151271e1), PW_R(-3.77277640472088e-32), PW_R(-7.54555280944176e-32)}},
     {PW_R(-1.2633796428742662e-2), PW_R(-4.714997016454987e-2), PW_R(-9.999999999999998e-1)}},
    /* 14: basic ports 1 2 6 */
    {{1, 2, 6}, UINT32_C(0x00000080),
     {{PW_R(2.7825307718558173e-1), PW_R(2.223588857999364e0), PW_R(-2.72311097756864e-16)},
      {PW_R(-1.0384546214189756e0), PW_R(1.36155548878432e-16), PW_R(2.223588857999364e0)},
      {PW_R(-4.404900439151271e1), PW_R(3.77277640472088e-32), PW_R(7.54555280944176e-32)}},
     {PW_R(1.2633796428742666e-2), PW_R(-4.714997016454988e-2), PW_R(-9.999999999999998e-1)}},
    /* 15: basic ports 1 2 7 */
    {{1, 2, 7}, UINT32_C(0x00000000),
     {{PW_R(-2.782530771855816e-1), PW_R(2.223588857999364e0), PW_R(-2.72311097756864e-16)},
      {PW_R(1.0384546214189758e0), PW_R(1.36155548878432e-16), PW_R(2.223588857999364e0)},
      {PW_R(-4.404900439151272e1), PW_R(3.772776404720881e-32), PW_R(7.545552809441761e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 16: basic ports 1 4 5 */
    {{1, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(-3.130069231475345e-17), PW_R(2.2235888579993643e0), PW_R(-5.95808838799772e-1)},
      {PW_R(2.2024502195756362e1), PW_R(2.8877123019009194e-15), PW_R(4.715992078551068e1)},
      {PW_R(2.202450219575636e1), PW_R(-2.887712301900919e-15), PW_R(-4.715992078551067e1)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 17: basic ports 1 4 7 */
    {{1, 4, 7}, UINT32_C(0x00000004),
     {{PW_R(-2.782530771855817e-1), PW_R(2.2235888579993643e0), PW_R(-3.130069231475345e-16)},
      {PW_R(2.2024502195756362e1), PW_R(2.887712301900919e-15), PW_R(4.715992078551067e1)},
      {PW_R(-2.202450219575636e1), PW_R(2.887712301900919e-15), PW_R(4.715992078551067e1)}},
     {PW_R(1.830186603259285e-17), PW_R(-2.1208921161775383e1), PW_R(-2.1208921161775383e1)}},
    /* 18: basic ports 1 5 6 */
    {{1, 5, 6}, UINT32_C(0x00000001),
     {{PW_R(2.782530771855817e-1), PW_R(2.2235888579993643e0), PW_R(-1.8780415388852065e-16)},
      {PW_R(2.2024502195756355e1), PW_R(-2.8877123019009186e-15), PW_R(-4.7159920785510664e1)},
      {PW_R(-2.2024502195756355e1), PW_R(-2.8877123019009186e-15), PW_R(-4.7159920785510664e1)}},
     {PW_R(-8.445992756839689e-17), PW_R(-2.120892116177538e1), PW_R(-2.120892116177538e1)}},
    /* 19: basic ports 1 6 7 */
    {{1, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(6.260138462950688e-17), PW_R(2.223588857999364e0), PW_R(5.958088387997713e-1)},
      {PW_R(-2.2024502195756355e1), PW_R(-2.8877123019009182e-15), PW_R(-4.715992078551066e1)},
      {PW_R(-2.2024502195756355e1), PW_R(2.8877123019009186e-15), PW_R(4.7159920785510664e1)}},
     {PW_R(-0e0), PW_R(0e0), PW_R(-0e0)}},
    /* 20: basic ports 2 3 4 */
    {{2, 3, 4}, UINT32_C(0x00000000),
     {{PW_R(-1.0384546214189756e0), PW_R(4.0846664663529596e-16), PW_R(2.223588857999364e0)},
      {PW_R(2.782530771855816e-1), PW_R(-2.223588857999364e0), PW_R(2.72311097756864e-16)},
      {PW_R(4.404900439151272e1), PW_R(-1.3860955643820254e-47), PW_R(-7.545552809441761e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 21: basic ports 2 3 5 */
    {{2, 3, 5}, UINT32_C(0x00000010),
     {{PW_R(1.0384546214189756e0), PW_R(4.0846664663529586e-16), PW_R(2.223588857999364e0)},
      {PW_R(-2.7825307718558157e-1), PW_R(-2.223588857999364e0), PW_R(2.72311097756864e-16)},
      {PW_R(4.404900439151271e1), PW_R(-1.3860955643820252e-47), PW_R(-7.54555280944176e-32)}},
     {PW_R(-4.714997016454987e-2), PW_R(1.2633796428742662e-2), PW_R(-9.999999999999998e-1)}},
    /* 22: basic ports 2 3 6 */
    {{2, 3, 6}, UINT32_C(0x00000080),
     {{PW_R(-1.0384546214189756e0), PW_R(4.0846664663529586e-16), PW_R(2.223588857999364e0)},
      {PW_R(-2.7825307718558173e-1), PW_R(-2.223588857999364e0), PW_R(2.72311097756864e-16)},
      {PW_R(-4.404900439151271e1), PW_R(1.3860955643820252e-47), PW_R(7.54555280944176e-32)}},
     {PW_R(-4.714997016454988e-2), PW_R(-1.2633796428742666e-2), PW_R(-9.999999999999998e-1)}},
    /* 23: basic ports 2 3 7 */
    {{2, 3, 7}, UINT32_C(0x00000000),
     {{PW_R(1.0384546214189758e0), PW_R(4.0846664663529596e-16), PW_R(2.223588857999364e0)},
      {PW_R(2.782530771855816e-1), PW_R(-2.223588857999364e0), PW_R(2.72311097756864e-16)},
      {PW_R(-4.404900439151272e1), PW_R(1.3860955643820254e-47), PW_R(7.545552809441761e-32)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 24: basic ports 2 4 5 */
    {{2, 4, 5}, UINT32_C(0x00000008),
     {{PW_R(1.1681577403074062e-16), PW_R(-8.29854659319769e0), PW_R(2.2235888579993652e0)},
      {PW_R(2.202450219575636e1), PW_R(1.760032204524495e2), PW_R(-2.1554178056671826e-14)},
      {PW_R(2.202450219575636e1), PW_R(-1.7600322045244948e2), PW_R(2.1554178056671823e-14)}},
     {PW_R(-3.73205080756888e0), PW_R(7.915277134946852e1), PW_R(-7.915277134946851e1)}},
    /* 25: basic ports 2 4 6 */
    {{2, 4, 6}, UINT32_C(0x00000002),
     {{PW_R(-1.0384546214189758e0), PW_R(4.672630961229624e-16), PW_R(2.2235888579993643e0)},
      {PW_R(2.2024502195756362e1), PW_R(1.7600322045244948e2), PW_R(-2.1554178056671823e-14)},
      {PW_R(-2.202450219575635e1), PW_R(1.7600322045244943e2), PW_R(-2.155417805667182e-14)}},
     {PW_R(-1.4890682063519545e-16), PW_R(-7.915277134946851e1), PW_R(-7.915277134946848e1)}},
    /* 26: basic ports 2 5 7 */
    {{2, 5, 7}, UINT32_C(0x00000008),
     {{PW_R(1.0384546214189758e0), PW_R(4.672630961229625e-16), PW_R(2.2235888579993643e0)},
      {PW_R(2.202450219575636e1), PW_R(-1.7600322045244948e2), PW_R(2.1554178056671823e-14)},
      {PW_R(-2.202450219575636e1), PW_R(-1.760032204524495e2), PW_R(2.1554178056671826e-14)}},
     {PW_R(2.6442140720460182e-17), PW_R(-7.915277134946851e1), PW_R(-7.915277134946852e1)}},
    /* 27: basic ports 2 6 7 */
    {{2, 6, 7}, UINT32_C(0x00000002),
     {{PW_R(2.336315480614812e-16), PW_R(8.298546593197688e0), PW_R(2.223588857999363e0)},
      {PW_R(-2.202450219575635e1), PW_R(1.7600322045244943e2), PW_R(-2.155417805667182e-14)},
      {PW_R(-2.2024502195756362e1), PW_R(-1.7600322045244948e2), PW_R(2.1554178056671823e-14)}},
     {PW_R(-3.732050807568879e0), PW_R(-7.915277134946848e1), PW_R(7.915277134946851e1)}},
    /* 28: basic ports 3 4 5 */
    {{3, 4, 5}, UINT32_C(0x00000000),
     {{PW_R(3.130069231475345e-17), PW_R(-2.2235888579993643e0), PW_R(5.95808838799772e-1)},
      {PW_R(2.2024502195756362e1), PW_R(8.663136905702756e-15), PW_R(4.715992078551068e1)},
      {PW_R(2.202450219575636e1), PW_R(-8.663136905702756e-15), PW_R(-4.715992078551067e1)}},
     {PW_R(-0e0), PW_R(-0e0), PW_R(-0e0)}},
    /* 29: basic ports 3 4 7 */
    {{3, 4, 7}, UINT32_C(0x00000004),
     {{PW_R(2.782530771855817e-1), PW_R(-2.2235888579993643e0), PW_R(3.130069231475345e-16)},
      {PW_R(2.2024502195756362e1), PW_R(8.663136905702756e-15), PW_R(4.715992078551067e1)},
      {PW_R(-2.202450219575636e1), PW_R(8.663136905702756e-15), PW_R(4.715992078551067e1)}},
     {PW_R(-1.830186603259285e-17), PW_R(-2.1208921161775383e1), PW_R(-2.1208921161775383e1)}},
    /* 30: basic ports 3 5 6 */
    {{3, 5, 6}, UINT32_C(0x00000001),
     {{PW_R(-2.782530771855817e-1), PW_R(-2.2235888579993643e0), PW_R(1.8780415388852065e-16)},
      {PW_R(2.2024502195756355e1), PW_R(-8.663136905702754e-15), PW_R(-4.7159920785510664e1)},
      {PW_R(-2.2024502195756355e1), PW_R(-8.663136905702754e-15), PW_R(-4.7159920785510664e1)}},
     {PW_R(8.445992756839689e-17), PW_R(-2.120892116177538e1), PW_R(-2.120892116177538e1)}},
    /* 31: basic ports 3 6 7 */
    {{3, 6, 7}, UINT32_C(0x00000000),
     {{PW_R(-6.260138462950688e-17), PW_R(-2.223588857999364e0), PW_R(-5.958088387997713e-1)},
      {PW_R(-2.2024502195756355e1), PW_R(-8.663136905702754e-15), PW_R(-4.715992078551066e1)},
      {PW_R(-2.2024502195756355e1), PW_R(8.663136905702754e-15), PW_R(4.7159920785510664e1)}},
     {PW_R(0e0), PW_R(0e0), PW_R(-0e0)}},
    /* 32: basic ports 4 5 6 */
    {{4, 5, 6}, UINT32_C(0x00000003),
     {{PW_R(2.2024502195756355e1), PW_R(1.7600322045244945e2), PW_R(-1.4865219251218473e-14)},
      {PW_R(2.2024502195756355e1), PW_R(-9.910146167478981e-15), PW_R(-4.7159920785510664e1)},
      {PW_R(-2.4775365418697454e-15), PW_R(1.7600322045244945e2), PW_R(-4.715992078551068e1)}},
     {PW_R(-7.91527713494685e1), PW_R(-2.1208921161775375e1), PW_R(-1.0036169251124389e2)}},
    /* 33: basic ports 4 5 7 */
    {{4, 5, 7}, UINT32_C(0x0000000C),
     {{PW_R(2.202450219575636e1), PW_R(9.910146167478985e-15), PW_R(4.715992078551067e1)},
      {PW_R(2.202450219575636e1), PW_R(-1.7600322045244948e2), PW_R(2.477536541869746e-14)},
      {PW_R(2.477536541869746e-15), PW_R(-1.760032204524495e2), PW_R(4.715992078551069e1)}},
     {PW_R(-2.1208921161775383e1), PW_R(-7.915277134946852e1), PW_R(-1.003616925112439e2)}},
    /* 34: basic ports 4 6 7 */
    {{4, 6, 7}, UINT32_C(0x00000006),
     {{PW_R(4.955073083739491e-15), PW_R(1.7600322045244945e2), PW_R(4.7159920785510636e1)},
      {PW_R(-2.202450219575635e1), PW_R(1.7600322045244943e2), PW_R(-2.4775365418697453e-14)},
      {PW_R(-2.2024502195756355e1), PW_R(9.910146167478981e-15), PW_R(4.7159920785510664e1)}},
     {PW_R(-1.0036169251124387e2), PW_R(-7.915277134946848e1), PW_R(-2.1208921161775383e1)}},
    /* 35: basic ports 5 6 7 */
    {{5, 6, 7}, UINT32_C(0x00000009),
     {{PW_R(-4.955073083739492e-15), PW_R(-1.760032204524495e2), PW_R(-4.715992078551065e1)},
      {PW_R(-2.202450219575636e1), PW_R(-9.910146167478985e-15), PW_R(-4.715992078551067e1)},
      {PW_R(-2.2024502195756362e1), PW_R(-1.760032204524495e2), PW_R(1.4865219251218476e-14)}},
     {PW_R(-1.0036169251124389e2), PW_R(-2.1208921161775383e1), PW_R(-7.915277134946852e1)}},
};

static const pw_facet pw_facets[PW_FACET_COUNT] = {
    {{PW_R(1e0), PW_R(-4.282476365626794e-34), PW_R(-8.564952731253586e-34)}, PW_R(4.5403977402616535e-2)},
    {{PW_R(-1e0), PW_R(4.282476365626794e-34), PW_R(8.564952731253586e-34)}, PW_R(4.5403977402616535e-2)},
    {{PW_R(1.2416851079369771e-1), PW_R(-9.922611455293789e-1), PW_R(6.0758471789542e-17)}, PW_R(4.5188082645377037e-1)},
    {{PW_R(-1.2416851079369771e-1), PW_R(9.922611455293789e-1), PW_R(-6.0758471789542e-17)}, PW_R(4.5188082645377037e-1)},
    {{PW_R(-1.241685107936977e-1), PW_R(-9.922611455293789e-1), PW_R(6.0758471789542e-17)}, PW_R(4.5188082645377037e-1)},
    {{PW_R(1.241685107936977e-1), PW_R(9.922611455293789e-1), PW_R(-6.0758471789542e-17)}, PW_R(4.5188082645377037e-1)},
    {{PW_R(4.231463813959731e-1), PW_R(-1.1096051117990286e-16), PW_R(-9.060613334159524e-1)}, PW_R(4.2668953608061216e-1)},
    {{PW_R(-4.231463813959731e-1), PW_R(1.1096051117990286e-16), PW_R(9.060613334159524e-1)}, PW_R(4.2668953608061216e-1)},
    {{PW_R(-4.231463813959731e-1), PW_R(-1.1096051117990286e-16), PW_R(-9.060613334159524e-1)}, PW_R(4.2668953608061216e-1)},
    {{PW_R(4.231463813959731e-1), PW_R(1.1096051117990286e-16), PW_R(9.060613334159524e-1)}, PW_R(4.2668953608061216e-1)},
    {{PW_R(-8.85326076882515e-18), PW_R(9.659258262890683e-1), PW_R(-2.5881904510252074e-1)}, PW_R(5.562845744600075e-1)},
    {{PW_R(8.85326076882515e-18), PW_R(-9.659258262890683e-1), PW_R(2.5881904510252074e-1)}, PW_R(5.562845744600073e-1)},
    {{PW_R(2.6559782306475444e-17), PW_R(9.659258262890683e-1), PW_R(2.5881904510252046e-1)}, PW_R(5.562845744600073e-1)},
    {{PW_R(-2.6559782306475444e-17), PW_R(-9.659258262890683e-1), PW_R(-2.5881904510252046e-1)}, PW_R(5.562845744600073e-1)},
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
