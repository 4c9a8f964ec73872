/** Words for the covariance structures a fit can try. */
export const STRUCTURE_LABEL: Record<string, string> = {
  full: 'full',
  diagonal: 'diagonal',
  spherical: 'spherical',
  tied: 'tied',
};

export const STRUCTURE_HELP: Record<string, string> = {
  full: 'each cluster has its own shape and tilt',
  diagonal: 'own spread per feature, no tilt',
  spherical: 'one spread per cluster, round',
  tied: 'all clusters share one shape',
};
