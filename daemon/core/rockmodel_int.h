/* Internal to the core's rock models: the workspace behind rw_rm_ws
 * (rockmodel.h), shared by the inclusion models (ODE stepper) and the
 * inversion (nonlinear least squares, SVD scratch), and the
 * Hashin-Shtrikman bound the models are checked against. */
#ifndef RW_CORE_ROCKMODEL_INT_H
#define RW_CORE_ROCKMODEL_INT_H

#include <stddef.h>

#include <gsl/gsl_matrix.h>
#include <gsl/gsl_multifit_nlinear.h>
#include <gsl/gsl_odeiv2.h>
#include <gsl/gsl_vector.h>

struct rw_rm_ws {
	/* DEM: two unknowns, K/K_host and mu/mu_host */
	gsl_odeiv2_step *step;
	gsl_odeiv2_control *ctrl;
	gsl_odeiv2_evolve *evo;
	/* inversion: sizes, the full fit and the profile fit (one fewer
	 * parameter; NULL when n_par = 1) */
	size_t n_obs, n_par;
	gsl_multifit_nlinear_workspace *nl;
	gsl_multifit_nlinear_workspace *nl_prof;
	gsl_vector *u0, *u0_prof; /* start vectors */
	gsl_matrix *jac;          /* n_obs x n_par physical Jacobian */
	gsl_matrix *v;            /* n_par x n_par, SVD */
	gsl_vector *sv, *sv_work; /* n_par, SVD */
};

/* Hashin-Shtrikman 1963 upper bound of a solid (k, mu > 0) with a volume
 * fraction phi of empty pores, in closed form:
 *   K+ = (1 - phi) K a / (a + phi K), a = 4/3 mu,
 *   mu+ = (1 - phi) mu z / (z + phi mu), z = (mu/6)(9K + 8mu)/(K + 2mu).
 * (the lower bound is zero). Defined in granular.c. */
void rw__rm_hs_vacuum(double k, double mu, double phi, double *k_up,
                      double *mu_up);

/* RW_RM_WARN_ABOVE_HS when (k_dry, mu_dry) exceed that bound by more than
 * rounding, else 0. */
unsigned rw__rm_hs_check(double k, double mu, double phi, double k_dry,
                         double mu_dry);

#endif
