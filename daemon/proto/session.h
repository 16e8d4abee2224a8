/* Session internals other protocol files use (session.c): the work
 * estimate's view of inherited values and the byte accounting of the
 * defaults over all sessions. */
#ifndef RW_PROTO_SESSION_H
#define RW_PROTO_SESSION_H

#include "proto/internal.h"

/* 1 when s holds no defaults (or is NULL): no field then takes one. */
int proto__session_empty(const proto_session *s);
/* Length of the value the session would give field f of method m: the
 * array length, 1 for a scalar, 0 when the session has no such default. */
size_t proto__session_len(const proto_session *s, const proto_method *m,
                          const proto_field *f);
/* Adjusts the context's count of session bytes by + add - sub; refuses
 * (-1, nothing changed) when an increase would pass max_session_bytes. */
int proto__session_bytes_add(proto_ctx *ctx, size_t add, size_t sub);
/* Keeps a cJSON tree alive until the call ends (session values parsed
 * for a request point into it). 0, or -1 after deleting it when out of
 * memory. */
int proto__call_keep_json(proto_call *c, cJSON *tree);
/* Accepts an array of n internal-unit values (a session default) as
 * field f at dst: the field's array and bound rules, and its broadcast
 * group. 0 or -1 after proto_fail. */
int proto__vec_accept(proto_call *c, const proto_field *f, const char *path,
                      const double *v, size_t n, int is_array, void *dst);

#endif
