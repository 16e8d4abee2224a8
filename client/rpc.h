/* JSON-RPC helpers of the client: checking that an answer is a valid
 * JSON-RPC 2.0 response to the request it answers, one request and its
 * answer within a deadline, the daemon's self-description (rpc.discover,
 * service.info) and "did you mean" suggestions from it. */
#ifndef RW_CLI_RPC_H
#define RW_CLI_RPC_H

#include <stddef.h>
#include <stdio.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "format.h"

/* Parses line[0..len) with a length bound (cJSON_ParseWithLengthOpts,
 * nothing but blanks after the value) and checks it is a JSON-RPC 2.0
 * response: an object with "jsonrpc":"2.0", an "id", and exactly one of
 * "result" and "error" (an object with an integer "code" and a string
 * "message"). With expect_id not NULL the id must equal it (same type,
 * same number or string). Returns the tree (free with cJSON_Delete), or
 * NULL with the reason in why. */
cJSON *cli__rpc_parse(const char *line, size_t len, const cJSON *expect_id,
                      char *why, size_t whylen);
/* Numeric arrays of a result, read straight into doubles. */
#define CLI_NUMCOLS_MAX 128
typedef struct cli_numcol {
	size_t key, keylen; /* the member name: bytes of the line parsed */
	size_t at, n;       /* its values: pool[at .. at + n) */
} cli_numcol;
typedef struct cli_numcols {
	const char *line; /* the line last parsed (not owned) */
	cli_numcol col[CLI_NUMCOLS_MAX];
	size_t ncol;
	double *pool; /* every array's values; NaN for null */
	size_t pool_cap, pool_used;
	char *skel; /* the line with those arrays emptied */
	size_t skel_cap;
} cli_numcols;
/* As cli__rpc_parse, for answers carrying long numeric arrays: each
 * member of "result" (the first, when repeated) whose value is an array
 * of numbers and nulls is parsed by proto_num_array_parse into cols (the
 * same doubles as cJSON's strtod; null as NaN) and is an empty array in
 * the tree returned; every other array, and a whole line the scan cannot
 * follow, goes to cJSON as before, so the checks and messages are those
 * of cli__rpc_parse. cols stays valid until the next call on it (it
 * points into line); free its buffers with cli__numcols_free. */
cJSON *cli__rpc_parse_cols(const char *line, size_t len, const cJSON *expect_id,
                           cli_numcols *cols, char *why, size_t whylen);
/* The values of result member `key` read by cli__rpc_parse_cols (NULL
 * when that member was not read so: look in the tree), *n their count. */
const double *cli__numcols_get(const cli_numcols *cols, const char *key,
                               size_t *n);
void cli__numcols_free(cli_numcols *cols);
/* As cli__rpc_parse for a tree already parsed (one element of a batch
 * answer, say). 0 or -1 with why. */
int cli__rpc_check(const cJSON *r, const cJSON *expect_id, char *why,
                   size_t whylen);
/* 1 when a and b are the same JSON-RPC id (null, the same string, or the
 * same number compared exactly), else 0. */
int cli__id_equal(const cJSON *a, const cJSON *b);

/* Monotonic milliseconds. */
long long cli__now_ms(void);
/* Sends one request (method, params; params may be NULL and is not
 * taken) with the given numeric id and waits for its answer until
 * deadline_ms (cli__now_ms() scale; < 0 waits forever). Returns 0 with
 * *resp (the valid response; free with cJSON_Delete), or a CLI_EXIT_*
 * code with a message on stderr (CLI_EXIT_TIMEOUT, CLI_EXIT_IO). who
 * prefixes messages. */
int cli__roundtrip(cli_conn *c, const char *who, const char *method,
                   const cJSON *params, long id, long long deadline_ms,
                   cJSON **resp);
/* Writes one request line (blocking). 0 or -1. */
int cli__write_request(cli_conn *c, const char *method, const cJSON *params,
                       long id);
/* Reads the answer to id (a request already written) until deadline_ms,
 * as cli__roundtrip. */
int cli__await(cli_conn *c, const char *who, long id, long long deadline_ms,
               cJSON **resp);

/* Prints "WHO: error CODE: message: param: reason" for an error object
 * to f. */
void cli__print_error(FILE *f, const char *who, const cJSON *err);

/* The candidate closest to word (case-insensitive edit distance, with
 * transpositions) when it is close enough to be a likely typo: at most
 * 1 edit for words up to 4 characters, 2 up to 8, else 3. NULL if none
 * is. cands may contain NULLs, which are skipped. */
const char *cli__suggest(const char *word, const char *const *cands, size_t n);
/* The same over the member names of an object, or over the strings of an
 * array (either may be NULL). */
const char *cli__suggest_json(const char *word, const cJSON *names);

/* The method object called name in an rpc.discover result, or NULL. */
const cJSON *cli__method_doc(const cJSON *discover, const char *name);
/* Resolves a "#/components/..." $ref against the discover document;
 * returns node itself when it has no $ref. */
const cJSON *cli__schema_deref(const cJSON *discover, const cJSON *node);
/* Prints a suggestion for an error answer to a call of method with the
 * given params, using the discover document: a method name for -32601,
 * a parameter name (at any dotted depth) or an option value for -32602.
 * Prints nothing when nothing is close. */
void cli__explain_error(FILE *f, const char *who, const cJSON *discover,
                        const char *method, const cJSON *params,
                        const cJSON *err);

/* The QC legend of a service.info result: for bit index b (0..31) the
 * flag's name, or NULL. Accepts the legend with a "mask" (1, 2, 4, ...)
 * or an "index" (0..31) per flag, and the older single "bit" holding
 * the mask. names[] entries point into info (valid while it lives). */
void cli__qc_legend(const cJSON *info, const char *names[CLI_QC_BITS]);

/* Parses a --timeout value in seconds (fractions allowed, 0..1 year) into
 * milliseconds. 0 or -1. */
int cli__parse_seconds(const char *s, long *ms);
/* "WHO: unknown option --x; did you mean --y?" on stderr, suggesting from
 * opts (each with its leading dashes). */
void cli__unknown_option(const char *who, const char *arg,
                         const char *const *opts, size_t n);

#endif
