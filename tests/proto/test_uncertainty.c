/* Uncertainty through the protocol: any input of a per-sample method as a
 * distribution, the statistics of every output. Checks against facts
 * that do not depend on this code: a linear function of a normal input
 * has the propagated mean and standard deviation (the sum rule of
 * variances) within the Monte Carlo error, 3 sigma / sqrt(N); the
 * correlation asked for is recovered from the raw draws within its
 * sampling error (1 - rho^2) / sqrt(N); Latin hypercube sampling lowers
 * the error of the mean of a smooth function against plain Monte Carlo
 * at the same N (McKay, Beckman & Conover 1979); the same seed gives the
 * same answer to the bit on 1 and 2 threads; and a Gassmann scenario with
 * uncertain porosity and mineral shows what practitioners know (common
 * practice, e.g. the fluid-substitution discussions of Mavko, Mukerji &
 * Dvorkin 2009): the vp of a sand with 5 % gas and with 85 % gas overlap
 * within their P10-P90 ranges. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "proto/harness.h"

#define REQ(m, p)                                                              \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"" m "\",\"params\":" p "}"

static const cJSON *stat_of(const cJSON *r, const char *out, const char *st)
{
	const cJSON *o = h_result(r, out);
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, st);
	if (!v)
		fail_msg("no %s.%s", out, st);
	return v;
}

static double num0(const cJSON *v)
{
	if (cJSON_IsArray(v))
		v = v->child;
	assert_true(cJSON_IsNumber(v));
	return v->valuedouble;
}

static void test_linear(void **state)
{
	harness h;
	cJSON *r;
	double mean, sd, n = 4000;
	(void)state;

	h_init(&h);
	/* ai = rho vp with rho ~ N(2.3, 0.05) g/cm3 and vp = 3000 m/s:
	 * mean 6900, sd 150 (m/s * g/cm3) */
	r = h_call(&h, REQ("elastic.convert",
	                   "{\"rho\":{\"dist\":\"normal\",\"mean\":2.3,\"sd\":"
	                   "0.05},\"vp\":3000,\"vs\":1500,\"fields\":[\"ai\"],"
	                   "\"uncertainty\":{\"draws\":4000,\"sampling\":"
	                   "\"monte_carlo\",\"seed\":11}}"));
	assert_int_equal(h_code(r), 0);
	mean = num0(stat_of(r, "ai", "mean"));
	sd = num0(stat_of(r, "ai", "sd"));
	assert_true(fabs(mean - 6900) < 3 * 150 / sqrt(n));
	/* the sd's own sampling error is sd / sqrt(2 (N - 1)) */
	assert_true(fabs(sd - 150) < 3 * 150 / sqrt(2 * (n - 1)));
	/* the P10 and P90 of a normal: mean -+ 1.2815515655 sd */
	assert_true(fabs(num0(stat_of(r, "ai", "p90")) -
	                 (6900 + 1.2815515655446004 * 150)) < 15);
	assert_int_equal(
	    (int)cJSON_GetObjectItem(h_result(r, "uncertainty"), "draws")
	        ->valuedouble,
	    4000);
	cJSON_Delete(r);
	/* percentiles are a list of their own, not broadcast with the
	 * samples: 2 samples, 3 percentiles */
	r = h_call(&h, REQ("elastic.convert",
	                   "{\"rho\":[2.3,2.4],\"vp\":{\"dist\":\"normal\","
	                   "\"mean\":3000,\"sd\":100},\"vs\":1500,"
	                   "\"fields\":[\"vp\"],\"uncertainty\":{\"draws\":"
	                   "200,\"percentiles\":[5,50,95]}}"));
	assert_int_equal(h_code(r), 0);
	assert_int_equal(cJSON_GetArraySize(stat_of(r, "vp", "p95")), 2);
	cJSON_Delete(r);
	h_free(&h);
}

/* The answer of one request on a context with `threads` worker threads. */
static char *answer(int threads, const char *line)
{
	proto_limits lim;
	proto_ctx *ctx;
	proto_session *s;
	proto_buf out;
	char *text;

	proto_limits_default(&lim);
	lim.threads = threads;
	ctx = proto_ctx_new(&lim);
	s = proto_session_new(ctx);
	proto_buf_init(&out);
	rw_proto_handle(s, line, strlen(line), &out);
	text = proto_buf_take(&out, NULL);
	proto_session_free(s);
	proto_ctx_free(ctx);
	return text;
}

static void test_threads_and_seeds(void **state)
{
	const char *a = REQ(
	    "rock.substitute",
	    "{\"vp\":[3000,3100,3200],\"vs\":1600,\"rho\":2.25,\"porosity\":{"
	    "\"dist\":\"triangular\",\"low\":0.2,\"mode\":0.25,\"high\":0.3},"
	    "\"mineral\":{\"k\":{\"dist\":\"uniform\",\"low\":35,\"high\":38},"
	    "\"rho\":2.65},\"fluid_in_place\":{\"k\":2.8,\"rho\":1.05},"
	    "\"fluid_new\":{\"k\":0.05,\"rho\":0.2},\"uncertainty\":{\"draws\":"
	    "3000,\"seed\":5}}");
	const char *b = REQ(
	    "rock.substitute",
	    "{\"vp\":[3000,3100,3200],\"vs\":1600,\"rho\":2.25,\"porosity\":{"
	    "\"dist\":\"triangular\",\"low\":0.2,\"mode\":0.25,\"high\":0.3},"
	    "\"mineral\":{\"k\":{\"dist\":\"uniform\",\"low\":35,\"high\":38},"
	    "\"rho\":2.65},\"fluid_in_place\":{\"k\":2.8,\"rho\":1.05},"
	    "\"fluid_new\":{\"k\":0.05,\"rho\":0.2},\"uncertainty\":{\"draws\":"
	    "3000,\"seed\":6}}");
	char *one = answer(1, a), *two = answer(2, a), *other = answer(2, b);
	(void)state;
	assert_non_null(strstr(one, "\"result\""));
	assert_string_equal(one, two);       /* to the bit */
	assert_string_not_equal(one, other); /* another seed */
	free(one);
	free(two);
	free(other);
}

static void test_correlation_recovered(void **state)
{
	harness h;
	cJSON *r;
	const cJSON *dr, *drho, *dvp, *e, *f;
	double sx = 0, sy = 0, sxx = 0, syy = 0, sxy = 0, n = 0, rho;
	(void)state;

	h_init(&h);
	r = h_call(
	    &h, REQ("elastic.convert",
	            "{\"rho\":{\"dist\":\"normal\",\"mean\":2.3,\"sd\":0.05},"
	            "\"vp\":{\"dist\":\"normal\",\"mean\":3000,\"sd\":100},"
	            "\"vs\":1500,\"fields\":[\"rho\",\"vp\"],\"uncertainty\":"
	            "{\"draws\":5000,\"raw\":true,\"correlations\":{"
	            "\"inputs\":[\"rho\",\"vp\"],\"matrix\":[[1,0.6],[0.6,"
	            "1]]}}}"));
	assert_int_equal(h_code(r), 0);
	dr = h_result(r, "draws");
	drho = cJSON_GetObjectItemCaseSensitive(dr, "rho")->child;
	dvp = cJSON_GetObjectItemCaseSensitive(dr, "vp")->child;
	for (e = drho->child, f = dvp->child; e && f;
	     e = e->next, f = f->next) {
		sx += e->valuedouble, sy += f->valuedouble;
		sxx += e->valuedouble * e->valuedouble;
		syy += f->valuedouble * f->valuedouble;
		sxy += e->valuedouble * f->valuedouble;
		n++;
	}
	rho = (sxy - sx * sy / n) /
	      sqrt((sxx - sx * sx / n) * (syy - sy * sy / n));
	assert_true(n == 5000);
	assert_true(fabs(rho - 0.6) < 3 * (1 - 0.36) / sqrt(n));
	cJSON_Delete(r);
	h_free(&h);
}

/* The error of the mean of vp^2 (a smooth function) over 12 seeds. */
static double mean_error(harness *h, const char *sampling)
{
	double e2 = 0;
	/* vp ~ U(2800, 3200): E[m] = rho E[vp^2] with E[vp^2] =
	 * (b^3 - a^3) / (3 (b - a)) */
	double a = 2800, b = 3200;
	double truth = 2.3 * (b * b * b - a * a * a) / (3 * (b - a)) / 1e6;
	for (int seed = 1; seed <= 12; seed++) {
		char line[512];
		cJSON *r;
		snprintf(
		    line, sizeof line,
		    REQ("elastic.convert",
		        "{\"rho\":2.3,\"vp\":{\"dist\":\"uniform\",\"low\":"
		        "2800,\"high\":3200},\"vs\":1500,\"fields\":[\"m\"],"
		        "\"uncertainty\":{\"draws\":200,\"seed\":%d,"
		        "\"sampling\":\"%s\",\"sensitivities\":false}}"),
		    seed, sampling);
		r = h_call(h, line);
		assert_int_equal(h_code(r), 0);
		e2 += pow(num0(stat_of(r, "m", "mean")) - truth, 2);
		cJSON_Delete(r);
	}
	return sqrt(e2 / 12);
}

static void test_latin_beats_plain(void **state)
{
	harness h;
	double lhs, mc;
	(void)state;
	h_init(&h);
	lhs = mean_error(&h, "latin_hypercube");
	mc = mean_error(&h, "monte_carlo");
	if (!(lhs < 0.5 * mc))
		fail_msg("LHS error %g not well below MC error %g", lhs, mc);
	h_free(&h);
}

static void test_gas_overlap(void **state)
{
	harness h;
	double p10[2], p90[2];
	(void)state;
	h_init(&h);
	for (int k = 0; k < 2; k++) {
		char line[1024];
		cJSON *r;
		double sg = k ? 0.85 : 0.05;
		snprintf(
		    line, sizeof line,
		    REQ("rock.substitute",
		        "{\"vp\":3200,\"vs\":1700,\"rho\":2.28,\"porosity\":{"
		        "\"dist\":\"normal\",\"mean\":0.25,\"sd\":0.03},"
		        "\"mineral\":{\"k\":{\"dist\":\"uniform\",\"low\":33,"
		        "\"high\":38}},\"pressure\":25,\"temperature\":70,"
		        "\"fluid_in_place\":{\"brine\":{\"salinity\":60000}},"
		        "\"fluid_new\":{\"brine\":{\"salinity\":60000},\"gas\":"
		        "{"
		        "\"gravity\":0.65},\"saturation\":{\"brine\":%g,"
		        "\"gas\":"
		        "%g}},\"fields\":[\"vp\"],\"uncertainty\":{\"draws\":"
		        "2000}}"),
		    1 - sg, sg);
		r = h_call(&h, line);
		assert_int_equal(h_code(r), 0);
		p10[k] = num0(stat_of(r, "vp", "p10"));
		p90[k] = num0(stat_of(r, "vp", "p90"));
		cJSON_Delete(r);
	}
	/* the low-gas range reaches into the high-gas one */
	assert_true(p10[0] < p90[1]);
	h_free(&h);
}

static void test_categories_and_range(void **state)
{
	harness h;
	cJSON *r;
	const cJSON *p, *e;
	double sum = 0;
	(void)state;
	h_init(&h);
	r = h_call(&h,
	           REQ("reflect.interface",
	               "{\"upper\":{\"vp\":2800,\"vs\":1400,\"rho\":2.4},"
	               "\"lower\":{\"vp\":{\"dist\":\"normal\",\"mean\":"
	               "2600,\"sd\":200},\"vs\":1500,\"rho\":2.2},"
	               "\"angle\":[0,30],\"uncertainty\":{\"draws\":400}}"));
	assert_int_equal(h_code(r), 0);
	p = cJSON_GetObjectItem(h_result(r, "class"), "probability");
	cJSON_ArrayForEach(e, p) sum += e->valuedouble;
	assert_true(fabs(sum - 1) < 1e-12);
	assert_non_null(h_result(r, "qc_interface_probability"));
	cJSON_Delete(r);
	/* sensitivities of a per-angle output: at normal incidence R0 is
	 * close to dln(Z)/2, so to first order the variance splits as the
	 * variances of ln(vp) and ln(rho): (150/2600)^2 against
	 * (0.2/sqrt(12)/2.2)^2, a share of 0.83 for vp (the first-order
	 * variance decomposition; the share reported is rho_s^2 / sum) */
	r = h_call(&h,
	           REQ("reflect.interface",
	               "{\"upper\":{\"vp\":2800,\"vs\":1300,\"rho\":2.45},"
	               "\"lower\":{\"vp\":{\"dist\":\"normal\",\"mean\":"
	               "2600,\"sd\":150},\"vs\":1500,\"rho\":{\"dist\":"
	               "\"uniform\",\"low\":2.1,\"high\":2.3}},\"angle\":[0,"
	               "30],\"fields\":[\"rpp_re\"],\"uncertainty\":{"
	               "\"draws\":2000,\"sensitivities\":true}}"));
	assert_int_equal(h_code(r), 0);
	{
		const cJSON *sv = cJSON_GetObjectItem(
		    cJSON_GetObjectItem(h_result(r, "sensitivity"), "rpp_re"),
		    "lower.vp");
		const cJSON *share = cJSON_GetObjectItem(sv, "share");
		double vln = pow(150.0 / 2600, 2);
		double rln = pow(0.2 / sqrt(12.0) / 2.2, 2);
		assert_int_equal(cJSON_GetArraySize(share), 2);
		if (fabs(num0(share) - vln / (vln + rln)) > 0.05)
			fail_msg("vp share %g, first order %g", num0(share),
			         vln / (vln + rln));
	}
	cJSON_Delete(r);
	h_free(&h);
}

static void test_errors(void **state)
{
	harness h;
	(void)state;
	h_init(&h);
	h_expect_invalid(&h,
	                 REQ("elastic.convert",
	                     "{\"rho\":{\"dist\":\"normal\",\"mean\":2.3,"
	                     "\"sd\":0},\"vp\":3000,\"vs\":1500}"),
	                 "rho");
	h_expect_invalid(&h,
	                 REQ("elastic.convert",
	                     "{\"rho\":{\"dist\":\"nromal\",\"mean\":2.3,"
	                     "\"sd\":0.1},\"vp\":3000,\"vs\":1500}"),
	                 "rho.dist");
	h_expect_invalid(&h,
	                 REQ("elastic.convert",
	                     "{\"rho\":{\"dist\":\"normal\",\"mean\":2.3},"
	                     "\"vp\":3000,\"vs\":1500}"),
	                 "rho.sd");
	h_expect_invalid(&h,
	                 REQ("elastic.convert",
	                     "{\"rho\":{\"dist\":\"uniform\",\"low\":2.3,"
	                     "\"high\":2.4,\"sd\":1},\"vp\":3000,\"vs\":1500}"),
	                 "rho.sd");
	h_expect_invalid(&h,
	                 REQ("elastic.convert",
	                     "{\"rho\":2.3,\"vp\":3000,\"vs\":1500,"
	                     "\"uncertainty\":{}}"),
	                 "uncertainty");
	h_expect_invalid(
	    &h,
	    REQ("elastic.convert",
	        "{\"rho\":{\"dist\":\"normal\",\"mean\":2.3,\"sd\":0.1},"
	        "\"vp\":{\"dist\":\"normal\",\"mean\":3000,\"sd\":10},"
	        "\"vs\":1500,\"uncertainty\":{\"correlations\":{\"inputs\":["
	        "\"rho\",\"vp\"],\"matrix\":[[1,1.5],[1.5,1]]}}}"),
	    "uncertainty.correlations.matrix");
	h_expect_invalid(
	    &h,
	    REQ("elastic.convert",
	        "{\"rho\":{\"dist\":\"normal\",\"mean\":2.3,\"sd\":0.1},"
	        "\"vp\":3000,\"vs\":1500,\"uncertainty\":{\"correlations\":{"
	        "\"inputs\":[\"rho\",\"vs\"],\"matrix\":[[1,0.5],[0.5,1]]}}}"),
	    "uncertainty.correlations.inputs");
	h_expect_invalid(&h, REQ("mineral.list", "{\"uncertainty\":{}}"),
	                 "uncertainty");
	h_free(&h);
	/* draws x samples count against --max-work */
	{
		proto_limits lim;
		harness g;
		cJSON *r;
		proto_limits_default(&lim);
		lim.max_work = 1000;
		g.ctx = proto_ctx_new(&lim);
		g.s = proto_session_new(g.ctx);
		proto_buf_init(&g.out);
		r = h_call(&g, REQ("elastic.convert",
		                   "{\"rho\":{\"dist\":\"normal\",\"mean\":2.3,"
		                   "\"sd\":0.1},\"vp\":3000,\"vs\":1500,"
		                   "\"uncertainty\":{\"draws\":5000}}"));
		assert_int_equal(h_code(r), -32001);
		cJSON_Delete(r);
		h_free(&g);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_linear),
	    cmocka_unit_test(test_threads_and_seeds),
	    cmocka_unit_test(test_correlation_recovered),
	    cmocka_unit_test(test_latin_beats_plain),
	    cmocka_unit_test(test_gas_overlap),
	    cmocka_unit_test(test_categories_and_range),
	    cmocka_unit_test(test_errors),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
