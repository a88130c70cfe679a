/* check.h - a tiny assertion harness for dwell's unit tests.
 * CHECK(cond, ...) records a failure with file:line and a message;
 * CHECK_NEAR(a, b, tol, what); check_done() prints "N checks, M failed"
 * and returns the process status (0 when nothing failed). */
#ifndef DWELL_TEST_CHECK_H
#define DWELL_TEST_CHECK_H

#include <math.h>
#include <stdio.h>

static long check_count, check_failed;

#define CHECK(cond, ...) do { \
	check_count++; \
	if (!(cond)) { \
		check_failed++; \
		fprintf(stderr, "%s:%d: check failed: %s: ", __FILE__, __LINE__, #cond); \
		fprintf(stderr, __VA_ARGS__); \
		fputc('\n', stderr); \
	} \
} while (0)

#define CHECK_NEAR(a, b, tol, what) do { \
	double check_a_ = (a), check_b_ = (b); \
	CHECK(fabs(check_a_ - check_b_) <= (tol), "%s: %.17g vs %.17g (tol %.3g)", \
		(what), check_a_, check_b_, (double)(tol)); \
} while (0)

static inline int check_done(void)
{
	printf("%ld checks, %ld failed\n", check_count, check_failed);
	return check_failed ? 1 : 0;
}

#endif
