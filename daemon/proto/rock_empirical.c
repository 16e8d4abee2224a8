/* rock.empirical: the empirical velocity, density and porosity relations of
 * the core through the protocol, per sample with broadcasting: Gardner et
 * al. 1974 density (and its inverse), the Castagna et al. 1985 mudrock
 * line, Greenberg & Castagna 1992 shear velocity by lithology, the Han et
 * al. 1986 sandstone fits, the Wyllie et al. 1956 time average and the
 * Raymer, Hunt & Gardner 1980 transform. Also the lithology parser shared
 * with log.process. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/lith.h"
#include "rockwire/empirical.h"

#define Q(name, kind)                                                          \
	{                                                                      \
		name, PT_NUMS, kind, PP_NULLS, 0                               \
	}

static const proto_param emp_params[] = {
    {"relation", PT_STR, PK_NONE, PP_REQUIRED, 0},
    Q("vp", PK_VELOCITY),
    Q("vs", PK_VELOCITY),
    Q("rho", PK_DENSITY),
    Q("dtp", PK_SLOWNESS),
    Q("porosity", PK_NONE),
    Q("clay", PK_NONE),
    Q("v_matrix", PK_VELOCITY),
    Q("v_fluid", PK_VELOCITY),
    {"gardner_a", PT_NUM, PK_NONE, 0, 0},
    {"gardner_b", PT_NUM, PK_NONE, 0, 0},
    {"lithology", PT_ANY, PK_NONE, 0, 0},
    {"effective_pressure", PT_NUM, PK_PRESSURE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* The relations, their inputs (space-separated, in the order the handler
 * reads them) and their outputs. */
enum {
	R_GARDNER,
	R_GARDNER_INV,
	R_MUDROCK_VS,
	R_MUDROCK_VP,
	R_GC,
	R_HAN,
	R_WYLLIE,
	R_WYLLIE_PHI,
	R_RHG,
	R_RHG_PHI,
	R_COUNT
};

static const char *const rel_names[] = {"gardner",
                                        "gardner_inverse",
                                        "mudrock_vs",
                                        "mudrock_vp",
                                        "greenberg_castagna",
                                        "han",
                                        "wyllie",
                                        "wyllie_porosity",
                                        "raymer",
                                        "raymer_porosity",
                                        NULL};

/* Inputs each relation takes; "vp|dtp" means one of the two. Options
 * (gardner_a/b, lithology, effective_pressure) are listed too so that an
 * option given to a relation that ignores it is refused, not dropped. */
static const char *const rel_inputs[R_COUNT][6] = {
    [R_GARDNER] = {"vp|dtp", "gardner_a?", "gardner_b?"},
    [R_GARDNER_INV] = {"rho", "gardner_a?", "gardner_b?"},
    [R_MUDROCK_VS] = {"vp|dtp"},
    [R_MUDROCK_VP] = {"vs"},
    [R_GC] = {"vp|dtp", "lithology?"},
    [R_HAN] = {"porosity", "clay", "effective_pressure?"},
    [R_WYLLIE] = {"porosity", "v_matrix", "v_fluid"},
    [R_WYLLIE_PHI] = {"vp|dtp", "v_matrix", "v_fluid"},
    [R_RHG] = {"porosity", "v_matrix", "v_fluid"},
    [R_RHG_PHI] = {"vp|dtp", "v_matrix", "v_fluid"},
};

static const char *const lith_names[RW_EMP_NLITH] = {
    [RW_EMP_SANDSTONE] = "sandstone",
    [RW_EMP_LIMESTONE] = "limestone",
    [RW_EMP_DOLOMITE] = "dolomite",
    [RW_EMP_SHALE] = "shale",
};

int proto__lith_parse(proto_call *c, const cJSON *v, const char *path,
                      double frac[RW_EMP_NLITH])
{
	const cJSON *m;
	double sum = 0;
	char full[160];
	int i;

	for (i = 0; i < RW_EMP_NLITH; i++)
		frac[i] = 0;
	if (!v) {
		frac[RW_EMP_SANDSTONE] = 1;
		return 0;
	}
	if (cJSON_IsString(v)) {
		for (i = 0; i < RW_EMP_NLITH; i++)
			if (strcmp(v->valuestring, lith_names[i]) == 0) {
				frac[i] = 1;
				return 0;
			}
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "unknown lithology '%s'; accepted: "
		                  "sandstone, limestone, dolomite, shale, or "
		                  "an object of their volume fractions",
		                  v->valuestring);
	}
	if (!cJSON_IsObject(v) || !v->child)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "must be a lithology name or a non-empty "
		                  "object of volume fractions, e.g. "
		                  "{\"sandstone\": 0.7, \"shale\": 0.3}");
	cJSON_ArrayForEach(m, v)
	{
		snprintf(full, sizeof full, "%s.%s", path, m->string);
		for (i = 0; i < RW_EMP_NLITH; i++)
			if (strcmp(m->string, lith_names[i]) == 0)
				break;
		if (i == RW_EMP_NLITH)
			return proto_fail(c, PROTO_INVALID_PARAMS, full,
			                  "unknown lithology; accepted: "
			                  "sandstone, limestone, dolomite, "
			                  "shale");
		if (!cJSON_IsNumber(m) || !isfinite(m->valuedouble) ||
		    m->valuedouble < 0 || m->valuedouble > 1)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, full,
			    "must be a volume fraction in [0, 1]");
		frac[i] = m->valuedouble;
		sum += frac[i];
	}
	if (fabs(sum - 1) > 1e-6)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "fractions sum to %.9g, not 1 (tolerance "
		                  "1e-6)",
		                  sum);
	return 0;
}

uint32_t proto__emp_qc(unsigned warn)
{
	return warn ? QC_EMP_RANGE : 0;
}

/* Checks that the relation gets what it needs and nothing it ignores.
 * Sets *vel to the velocity input (vp, or 1/dtp) need. */
static int check_inputs(proto_call *c, int rel)
{
	const proto_args *a = &c->args;
	char used[16][24];
	size_t nused = 0;

	for (int j = 0; j < 6 && rel_inputs[rel][j]; j++) {
		const char *s = rel_inputs[rel][j];
		size_t len = strlen(s);
		int optional = s[len - 1] == '?';
		if (optional)
			len--;
		if (len == 6 && memcmp(s, "vp|dtp", 6) == 0) {
			int vp = proto_item_of(a, "vp") != NULL;
			int dtp = proto_item_of(a, "dtp") != NULL;
			if (vp && dtp)
				return proto_fail(c, PROTO_INVALID_PARAMS,
				                  "dtp",
				                  "give vp or dtp, not both");
			if (!vp && !dtp)
				return proto_fail(c, PROTO_INVALID_PARAMS, "vp",
				                  "relation '%s' needs vp or "
				                  "dtp",
				                  rel_names[rel]);
			memcpy(used[nused++], "vp", 3);
			memcpy(used[nused++], "dtp", 4);
			continue;
		}
		memcpy(used[nused], s, len);
		used[nused][len] = '\0';
		if (!optional && !proto_item_of(a, used[nused]))
			return proto_fail(c, PROTO_INVALID_PARAMS, used[nused],
			                  "relation '%s' needs this parameter",
			                  rel_names[rel]);
		nused++;
	}
	for (size_t i = 0; i < a->count; i++) {
		const char *name = a->spec[i].name;
		size_t j;
		if (!a->item[i] || strcmp(name, "relation") == 0)
			continue;
		for (j = 0; j < nused; j++)
			if (strcmp(used[j], name) == 0)
				break;
		if (j == nused)
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "relation '%s' does not use this "
			                  "parameter",
			                  rel_names[rel]);
	}
	return 0;
}

/* The velocity input of sample i: vp, or 1/dtp (NaN when missing or not
 * positive, which the core then refuses). */
static double vel_at(const proto_vec *vp, const proto_vec *dtp, size_t i)
{
	if (vp->present)
		return proto_at(vp, i);
	double dt = proto_at(dtp, i);
	return dt > 0 ? 1.0 / dt : NAN;
}

static int han_set(proto_call *c, int *pset)
{
	static const double mpa[RW_EMP_HAN_NSETS] = {[RW_EMP_HAN_40MPA] = 40,
	                                             [RW_EMP_HAN_30MPA] = 30,
	                                             [RW_EMP_HAN_20MPA] = 20,
	                                             [RW_EMP_HAN_10MPA] = 10,
	                                             [RW_EMP_HAN_5MPA] = 5};
	double p = proto_num_or(&c->args, "effective_pressure", 40);

	for (int i = 0; i < RW_EMP_HAN_NSETS; i++)
		if (fabs(p - mpa[i]) < 1e-6) {
			*pset = i;
			return 0;
		}
	return proto_fail(c, PROTO_INVALID_PARAMS, "effective_pressure",
	                  "Han et al. 1986 published fits at 5, 10, 20, 30 "
	                  "and 40 MPa only (%g MPa given)",
	                  p);
}

static int empirical(proto_call *c)
{
	const proto_args *a = &c->args;
	const proto_vec *vp = proto_vec_of(a, "vp"),
	                *dtp = proto_vec_of(a, "dtp");
	const proto_vec *vs = proto_vec_of(a, "vs"),
	                *rho = proto_vec_of(a, "rho");
	const proto_vec *phi = proto_vec_of(a, "porosity");
	const proto_vec *clay = proto_vec_of(a, "clay");
	const proto_vec *vma = proto_vec_of(a, "v_matrix");
	const proto_vec *vfl = proto_vec_of(a, "v_fluid");
	double ga = proto_num_or(a, "gardner_a", RW_EMP_GARDNER_A);
	double gb = proto_num_or(a, "gardner_b", RW_EMP_GARDNER_B);
	double frac[RW_EMP_NLITH];
	size_t n = a->n[0];
	int arr = a->any_array[0], pset = RW_EMP_HAN_40MPA;
	double *o1, *o2;
	uint32_t *flags;
	int rel = proto_enum_of(c, a, "relation", rel_names, -1);

	if (rel < 0)
		return -1;
	if (check_inputs(c, rel))
		return -1;
	if (!(ga > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS, "gardner_a",
		                  "must be > 0");
	if (!(gb > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS, "gardner_b",
		                  "must be > 0");
	if (rel == R_GC && proto__lith_parse(c, proto_item_of(a, "lithology"),
	                                     "lithology", frac))
		return -1;
	if (rel == R_HAN && han_set(c, &pset))
		return -1;
	if (proto_check_size(c, n, n))
		return -1;
	o1 = proto_alloc_doubles(c, n);
	o2 = proto_alloc_doubles(c, n);
	flags = proto_alloc(c, n * sizeof *flags);
	if (!o1 || !o2 || !flags)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", n);
	for (size_t i = 0; i < n; i++) {
		unsigned warn = 0;
		int st = RW_OK;
		o2[i] = NAN;
		switch (rel) {
		case R_GARDNER:
			st = rw_emp_gardner_density(vel_at(vp, dtp, i), ga, gb,
			                            &o1[i], &warn);
			break;
		case R_GARDNER_INV:
			st = rw_emp_gardner_vp(proto_at(rho, i), ga, gb, &o1[i],
			                       &warn);
			break;
		case R_MUDROCK_VS:
			st = rw_emp_mudrock_vs(vel_at(vp, dtp, i), &o1[i],
			                       &warn);
			break;
		case R_MUDROCK_VP:
			st = rw_emp_mudrock_vp(proto_at(vs, i), &o1[i], &warn);
			break;
		case R_GC:
			st = rw_emp_gc_vs_mixed(vel_at(vp, dtp, i), frac,
			                        &o1[i], &warn);
			break;
		case R_HAN:
			st = rw_emp_han_velocities(proto_at(phi, i),
			                           proto_at(clay, i), pset,
			                           &o1[i], &o2[i], &warn);
			break;
		case R_WYLLIE:
			st = rw_emp_wyllie_velocity(
			    proto_at(phi, i), proto_at(vma, i),
			    proto_at(vfl, i), &o1[i], &warn);
			break;
		case R_WYLLIE_PHI:
			st = rw_emp_wyllie_porosity(
			    vel_at(vp, dtp, i), proto_at(vma, i),
			    proto_at(vfl, i), &o1[i], &warn);
			break;
		case R_RHG:
			st = rw_emp_rhg_velocity(
			    proto_at(phi, i), proto_at(vma, i),
			    proto_at(vfl, i), &o1[i], &warn);
			break;
		default:
			st = rw_emp_rhg_porosity(
			    vel_at(vp, dtp, i), proto_at(vma, i),
			    proto_at(vfl, i), &o1[i], &warn);
			break;
		}
		flags[i] = st == RW_OK ? proto__emp_qc(warn) : QC_INPUT_INVALID;
		if (st != RW_OK)
			o1[i] = o2[i] = NAN;
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_str(c, "relation", rel_names[rel]);
	switch (rel) {
	case R_GARDNER: proto_w_vec(c, "rho", PK_DENSITY, o1, n, 1, arr); break;
	case R_GARDNER_INV:
	case R_MUDROCK_VP:
	case R_WYLLIE:
	case R_RHG: proto_w_vec(c, "vp", PK_VELOCITY, o1, n, 1, arr); break;
	case R_MUDROCK_VS:
	case R_GC: proto_w_vec(c, "vs", PK_VELOCITY, o1, n, 1, arr); break;
	case R_HAN:
		proto_w_vec(c, "vp", PK_VELOCITY, o1, n, 1, arr);
		proto_w_vec(c, "vs", PK_VELOCITY, o2, n, 1, arr);
		break;
	default: proto_w_vec(c, "porosity", PK_NONE, o1, n, 1, arr); break;
	}
	proto_w_flags(c, "qc", flags, n, arr);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_rock_empirical_methods[] = {
    {"rock.empirical", empirical, emp_params,
     "Empirical velocity, density and porosity relations (Gardner, "
     "mudrock line, Greenberg-Castagna, Han, Wyllie, Raymer-Hunt-Gardner)."},
    {NULL, NULL, NULL, NULL},
};
