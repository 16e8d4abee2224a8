/* libFuzzer target for the LAS 2.0 / 3.0 and CSV reader: any bytes fed in
 * uneven chunks with a small row block, handling every return code as a
 * caller would, then finish. The first byte also chooses CSV mode and the
 * depth order check. Build and run with tests/fuzz/run. */
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>

#include "las.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	cli_las_reader *r = cli_las_reader_new();
	double *rows = NULL;
	size_t pos = 0, step = size ? 1 + data[0] % 61 : 1;
	int rc = CLI_LAS_OK, guard = 0;

	if (!r)
		return 0;
	if (size && (data[0] & 0x40))
		cli_las_set_csv(r, -999.25);
	if (size && (data[0] & 0x80))
		cli_las_set_order_check(r, 1);
	while (pos < size && rc != CLI_LAS_ERR) {
		size_t used = 0, n = size - pos < step ? size - pos : step;
		rc = cli_las_feed(r, data + pos, n, &used);
		if (used > n)
			abort();
		pos += used;
		if (rc == CLI_LAS_HEADER || rc == CLI_LAS_FULL) {
			size_t nc = cli_las_ncurves(r);
			free(rows);
			rows = calloc(3 * (nc ? nc : 1), sizeof *rows);
			if (!rows)
				break;
			cli_las_set_block(r, rows, 3);
		}
		if (used == 0 && rc == CLI_LAS_OK && ++guard > 4)
			abort(); /* no progress with bytes left */
	}
	if (rc != CLI_LAS_ERR) {
		for (int i = 0; i < 100000; i++) {
			rc = cli_las_finish(r);
			if (rc != CLI_LAS_FULL)
				break;
			cli_las_set_block(r, rows, 3);
		}
	}
	(void)cli_las_error(r);
	(void)cli_las_warning(r);
	if (cli_las_bytes(r) > size)
		abort();
	free(rows);
	cli_las_reader_free(r);
	return 0;
}
