//go:build ignore

// (The line above keeps the Go tool from treating this file as cgo source.)

/*
 * convection.c: a student's own simulation of the lab's convection loop.
 *
 * The loop is modelled by the Lorenz equations (E. N. Lorenz, Deterministic
 * nonperiodic flow, J. Atmos. Sci. 20 (1963) 130-141) with sigma=10, rho=28,
 * beta=8/3: x is the flow around the loop, y and z the temperature
 * differences across and along it. The start (-5, -6, 22) is the state the
 * student logged when the heater came on (invented numbers).
 *
 * The integrator is the Bogacki-Shampine 3(2) embedded Runge-Kutta pair
 * (P. Bogacki and L. F. Shampine, A 3(2) pair of Runge-Kutta formulas,
 * Appl. Math. Lett. 2 (1989) 321-325), written from its published tableau,
 * advancing with the third-order solution, with the usual step-size
 * control: the error estimate in the root-mean-square norm weighted by
 * atol + rtol*max(|y|, |y_new|), and h_new = h*min(5, max(0.2, 0.9*err^(-1/3))).
 * Steps are shortened to land on the output times, which are k*dt.
 *
 * Usage:
 *   convection --rtol X --atol X --out FILE [--perturb EPS] [--float32]
 *              [--t1 T] [--dt D]
 *
 *   --perturb EPS  multiply each start value by (1 + EPS)
 *   --float32      store the state in single precision after each step
 *   --t1 T         end time (default 10)
 *   --dt D         output interval (default 0.01)
 *
 * Writes CSV "t,x,y,z" to FILE, every number with 17 significant digits so
 * that reading it back gives the same doubles. Exit status 2 on bad usage,
 * 1 when the integration fails.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define N 3

static const double sigma = 10.0, rho = 28.0, beta = 8.0 / 3.0;

static void field(const double *y, double *f)
{
	f[0] = sigma * (y[1] - y[0]);
	f[1] = y[0] * (rho - y[2]) - y[1];
	f[2] = y[0] * y[1] - beta * y[2];
}

static int usage(const char *msg)
{
	fprintf(stderr, "convection: %s\n", msg);
	fprintf(stderr, "usage: convection --rtol X --atol X --out FILE [--perturb EPS] [--float32] [--t1 T] [--dt D]\n");
	return 2;
}

/* number reads a positive (or, with allow_zero, non-negative) finite value. */
static int number(const char *flag, const char *s, int allow_zero, double *v)
{
	char *end;
	*v = strtod(s, &end);
	if (*s == '\0' || *end != '\0' || !isfinite(*v) || *v < 0 || (*v == 0 && !allow_zero)) {
		fprintf(stderr, "convection: %s: bad value \"%s\"\n", flag, s);
		return 0;
	}
	return 1;
}

static double store(double v, int single)
{
	return single ? (double)(float)v : v;
}

int main(int argc, char **argv)
{
	double rtol = -1, atol = -1, eps = 0, t1 = 10, dt = 0.01;
	const char *out = NULL;
	int single = 0;
	for (int i = 1; i < argc; i++) {
		const char *a = argv[i];
		if (strcmp(a, "--float32") == 0) {
			single = 1;
			continue;
		}
		if (i + 1 >= argc)
			return usage("a flag is missing its value");
		const char *v = argv[++i];
		int ok = 1;
		if (strcmp(a, "--rtol") == 0)
			ok = number(a, v, 0, &rtol);
		else if (strcmp(a, "--atol") == 0)
			ok = number(a, v, 1, &atol);
		else if (strcmp(a, "--perturb") == 0) {
			char *end;
			eps = strtod(v, &end);
			ok = *v != '\0' && *end == '\0' && isfinite(eps);
			if (!ok)
				fprintf(stderr, "convection: --perturb: bad value \"%s\"\n", v);
		} else if (strcmp(a, "--t1") == 0)
			ok = number(a, v, 0, &t1);
		else if (strcmp(a, "--dt") == 0)
			ok = number(a, v, 0, &dt);
		else if (strcmp(a, "--out") == 0)
			out = v;
		else {
			fprintf(stderr, "convection: unknown flag %s\n", a);
			return 2;
		}
		if (!ok)
			return 2;
	}
	if (rtol < 0 || atol < 0 || out == NULL)
		return usage("--rtol, --atol and --out are required");

	FILE *fp = fopen(out, "w");
	if (fp == NULL) {
		perror("convection: --out");
		return 1;
	}
	double y[N] = {-5.0, -6.0, 22.0};
	for (int i = 0; i < N; i++)
		y[i] = store(y[i] * (1.0 + eps), single);

	/* Bogacki-Shampine 3(2): c = (0, 1/2, 3/4, 1), FSAL. */
	double k1[N], k2[N], k3[N], k4[N], yt[N], yn[N];
	double t = 0, h = 1e-3;
	long nout = (long)floor(t1 / dt + 1e-9), steps = 0;
	field(y, k1);
	fprintf(fp, "t,x,y,z\n%.17g,%.17g,%.17g,%.17g\n", t, y[0], y[1], y[2]);
	for (long k = 1; k <= nout; k++) {
		double tout = k * dt;
		while (t < tout) {
			if (++steps > 10000000) {
				fprintf(stderr, "convection: step budget exhausted at t=%g\n", t);
				fclose(fp);
				return 1;
			}
			double hs = h, left = tout - t;
			int clipped = hs >= left;
			if (clipped)
				hs = left;
			for (int i = 0; i < N; i++)
				yt[i] = y[i] + hs * (0.5 * k1[i]);
			field(yt, k2);
			for (int i = 0; i < N; i++)
				yt[i] = y[i] + hs * (0.75 * k2[i]);
			field(yt, k3);
			for (int i = 0; i < N; i++)
				yn[i] = y[i] + hs * (2.0 / 9.0 * k1[i] + 1.0 / 3.0 * k2[i] + 4.0 / 9.0 * k3[i]);
			field(yn, k4);
			double err = 0;
			for (int i = 0; i < N; i++) {
				/* third-order minus second-order solution */
				double e = hs * ((2.0 / 9.0 - 7.0 / 24.0) * k1[i] + (1.0 / 3.0 - 0.25) * k2[i] +
						 (4.0 / 9.0 - 1.0 / 3.0) * k3[i] - 0.125 * k4[i]);
				double sc = atol + rtol * fmax(fabs(y[i]), fabs(yn[i]));
				err += (e / sc) * (e / sc);
			}
			err = sqrt(err / N);
			double fac = err > 0 ? 0.9 * pow(err, -1.0 / 3.0) : 5.0;
			fac = fmin(5.0, fmax(0.2, fac));
			if (!isfinite(err)) {
				fprintf(stderr, "convection: the state is not finite at t=%g\n", t);
				fclose(fp);
				return 1;
			}
			if (err <= 1) {
				t = clipped ? tout : t + hs;
				for (int i = 0; i < N; i++)
					y[i] = store(yn[i], single);
				if (single)
					field(y, k1);
				else
					memcpy(k1, k4, sizeof k1);
				if (!clipped || hs * fac < h)
					h = hs * fac;
			} else {
				h = hs * fac;
			}
		}
		fprintf(fp, "%.17g,%.17g,%.17g,%.17g\n", tout, y[0], y[1], y[2]);
	}
	if (fclose(fp) != 0) {
		perror("convection: --out");
		return 1;
	}
	return 0;
}
