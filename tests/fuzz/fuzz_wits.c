/* libFuzzer target for the WITS level 0 parser: any bytes in uneven
 * chunks; every delivered record must hold 1..CLI_WITS_MAX_ITEMS items
 * with codes of at most four digits, finite values or text marked
 * as such, and every record begun counted once. Build and run with
 * tests/fuzz/run. */
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>

#include "wits.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void on_record(void *ctx, const cli_wits_item *items, size_t n)
{
	(void)ctx;
	if (n < 1 || n > CLI_WITS_MAX_ITEMS)
		abort();
	for (size_t i = 0; i < n; i++)
		if (items[i].code > 9999 ||
		    (items[i].text ? !isnan(items[i].value)
		                   : !isfinite(items[i].value)))
			abort();
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	cli_wits_parser p;
	size_t pos = 0, step = size ? 1 + data[0] % 37 : 1;

	cli_wits_init(&p, on_record, NULL);
	while (pos < size) {
		size_t n = size - pos < step ? size - pos : step;
		cli_wits_feed(&p, data + pos, n);
		pos += n;
	}
	cli_wits_finish(&p);
	{
		const cli_wits_stats *s = cli_wits_get_stats(&p);
		if (s->begun != s->records + s->bad_records + s->unterminated +
		                    s->empty ||
		    s->run_together > s->unterminated)
			abort();
	}
	return 0;
}
