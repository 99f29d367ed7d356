"""The commented example spec printed by ``meltzone sweep --example`` (invented planets)."""

EXAMPLE_SPEC = '''\
# meltzone sweep spec: many planets from one base config.
# Run:  meltzone sweep this.toml -o study.h5          (local cores)
#       meltzone sweep this.toml -o study.h5 --dask-local 4
#       meltzone sweep this.toml -o study.h5 --scheduler tcp://HOST:8786
# Stop with Ctrl-C and finish later with --resume. Results are model estimates.

[sweep]
# "grid" | "latin-hypercube" | "sobol" | "monte-carlo" | "observed"
mode = "latin-hypercube"
# number of cases (not for "grid"; a power of 2 for "sobol")
samples = 32
# seed of the sample (not for "grid"): the same seed gives the same cases
seed = 2024
# base_file = "planet.toml"   # optional planet config under [base] (path relative to this file)

# The base planet: any key of `meltzone config --example`, in the same sections.
[base.planet]
name = "Orrin sweep (invented planets)"

[base.interior]
mantle_nodes = 128

[base.run]
end_time_gyr = 4.5

# One table per swept key, named "section.key".
# grid:                 values = [1.0, 2.0, 4.0]
# latin-hypercube/sobol/monte-carlo:
#   uniform:            min = 0.5, max = 15.0 (add scale = "log" for log-uniform)
#   normal / lognormal: distribution = "normal", mean = ..., sd = ..., optional min/max truncation
[parameters."planet.mass_earth"]
min = 0.5
max = 15.0
scale = "log"

[parameters."planet.core_mass_fraction"]
min = 0.15
max = 0.45

[parameters."melting.water_wt_percent"]
distribution = "lognormal"
mean = 0.05
sd = 0.05
max = 1.0

# ---- observed mode: an invented planet with invented measurements ----
# [sweep]
# mode = "observed"
# samples = 200
# seed = 7
#
# [observed]
# mass_earth = 5.2        # measured mass [Earth masses]
# mass_sigma = 0.6        # 1-sigma uncertainty
# radius_earth = 1.55     # measured radius [Earth radii]
# radius_sigma = 0.05
# age_gyr = 3.0           # age at which outcome probabilities are evaluated (model time)
#
# Each draw's core mass fraction is inferred from (M, R); draws no rocky composition with
# core mass fraction 0-0.8 can fit are rejected and counted. Other uncertain keys may be added
# as [parameters."section.key"] tables with a distribution.
'''

