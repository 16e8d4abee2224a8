/* The method declarations are consistent: every name a rule or a
 * condition gives is declared, offsets lie inside their structs, enums
 * have choices, outputs fit their rows (proto__decl_selfcheck); and the
 * generated schema lists every declared parameter of every method. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "proto/internal.h"

static void test_selfcheck(void **state)
{
	char why[256] = "";
	(void)state;
	if (proto__decl_selfcheck(why, sizeof why))
		fail_msg("declaration problem: %s", why);
}

static void test_schema_lists_params(void **state)
{
	cJSON *doc = proto__openrpc();
	const cJSON *m;
	size_t seen = 0;

	(void)state;
	assert_non_null(doc);
	cJSON_ArrayForEach(m, cJSON_GetObjectItem(doc, "methods"))
	{
		const proto_method *pm = proto_method_find(
		    cJSON_GetObjectItem(m, "name")->valuestring);
		const cJSON *params = cJSON_GetObjectItem(m, "params");
		assert_non_null(pm);
		seen++;
		if (pm->openrpc_params)
			continue;
		for (const proto_field *f = pm->params->fields; f->name; f++) {
			const cJSON *p;
			int found = 0;
			cJSON_ArrayForEach(p, params) found |=
			    strcmp(cJSON_GetObjectItem(p, "name")->valuestring,
			           f->name) == 0;
			if (!found)
				fail_msg("%s: %s not in the schema", pm->name,
				         f->name);
		}
	}
	assert_true(seen > 10);
	assert_null(proto_method_at(seen));
	cJSON_Delete(doc);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_selfcheck),
	    cmocka_unit_test(test_schema_lists_params),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
