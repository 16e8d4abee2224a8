/* Prints the OpenRPC document that rpc.discover serves, generated from the
 * method declarations (daemon/proto/schema.c), to the file given as the
 * first argument (or stdout). The build runs it; protocol-docs/
 * build-openrpc turns the output into the committed, pretty-printed
 * protocol-docs/openrpc.json, and tests/e2e/test_schema.py fails when the
 * two differ. */
#include <stdio.h>
#include <stdlib.h>

#include <cjson/cJSON.h>

#include "proto/internal.h"

int main(int argc, char **argv)
{
	cJSON *doc = proto__openrpc();
	char *text;
	FILE *f = stdout;
	int rc = 0;

	if (!doc) {
		fprintf(stderr, "gen_openrpc: out of memory\n");
		return 1;
	}
	text = cJSON_PrintUnformatted(doc);
	if (argc > 1 && !(f = fopen(argv[1], "w"))) {
		perror(argv[1]);
		rc = 1;
	} else if (!text || fputs(text, f) < 0 || fputc('\n', f) < 0) {
		fprintf(stderr, "gen_openrpc: cannot write the document\n");
		rc = 1;
	}
	if (f && f != stdout && fclose(f))
		rc = 1;
	free(text);
	cJSON_Delete(doc);
	return rc;
}
