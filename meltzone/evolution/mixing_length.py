"""The mixing-length scheme: a radially resolved mantle whose melt layers are found, not assumed
(``convection.scheme = "mixing-length"``).

Finite volumes on the interior's mantle nodes (CMB -> surface): each node is a cell whose faces lie at the
midpoints between nodes, the CMB and the surface being the outer faces (half cells at both ends); cell masses
and face areas 4 pi r^2 from the interior. State: the specific enthalpy of every cell with the latent heat in
it, h = c_p T + L phi(T, P) (the boundary-layer scheme's stored-heat convention c_m T + L phi), the core's
stored heat (the boundary-layer scheme's core: adiabatic core with inner-core latent and gravitational energy,
Stevenson et al. 1983; Labrosse 2015) and the integrated surface loss for the energy closure.

Physics (kernels in :mod:`meltzone._core.mlt_physics`, integrator in :mod:`meltzone._core.implicit`):

* face flux = conduction -k dT/dr + mixing-length convection F = rho c_p kappa_h s where the gradient is
  super-adiabatic, s = -(dT/dr - (dT/dr)_ad) > 0 [K/m]; eddy diffusivity kappa_h = alpha g l^4 s / (18 nu)
  (viscous) or (alpha g l^4 s / 16)^(1/2) (inertial), whichever is smaller, l = distance to the nearer
  boundary (CMB or surface), nu = eta / rho (Abe 1997, PEPI 100:27; Bower et al. 2018, PEPI 274:49; forms
  from memory, the search tool's corpus had neither paper's text);
* adiabat: two-phase isentrope c_p dT + L dphi = alpha T dP / rho (the first law along an isentrope of a
  melting mixture whose latent heat is L dphi; e.g. Solomatov 2015, Treatise on Geophysics 9.04, from memory),
  with alpha dP / (rho c_p) = d ln f taken from the interior's solid adiabat f(r). Discretely the parcel of the
  lower cell a taken to the upper cell b has h_ad = h_a + c_p T_a (f_b / f_a - 1), and s = (h_ad - h_b) /
  (c_p dr): the convective flux is rho kappa_h (h_ad - h_b) / dr, i.e. it carries enthalpy (latent heat
  included) down the super-adiabatic excess;
* viscosity: the boundary-layer scheme's law (liquid, Einstein-Roscoe suspension across the rheological
  transition, Arrhenius solid with activation volume and melt weakening); at an internal face the geometric
  mean of the two cells' viscosities, each at its own T, phi and pressure (this model's choice; interface
  coefficients from the cells' own values, Patankar 1980, ch. 4). The viscosity at the cells' mean melt
  fraction made the heat supply of a top cell at phi_c depend on its own melt fraction through the steep middle
  of the blend, while the surface boundary layer (the top cell's own phi, where the blend is flat) did not: the
  top cell then froze and re-melted in relaxation oscillations (measured: 83 magma-ocean end/reform flips for
  5 M_E at 256 nodes, none with the geometric mean). The mixing-length forms are from memory (searched: only
  Bower et al. 2018's abstract was found, not the forms);
* outer faces: thermal boundary layers from a local critical Rayleigh number, delta = (kappa eta Ra_cr /
  (alpha rho g |dT|))^(1/3), flux k dT / min(delta, dr_0) with dr_0 the distance to the outer cell's centroid
  (see "Outer cells"; Stevenson, Spohn & Schubert 1983, Icarus
  54:466, the boundary-layer scheme's lower layer): at the CMB dT = T_c - T_0, eta of the layer's material at
  their mean temperature and that temperature's melt fraction at the CMB (this model's choice; the lowest cell's
  own melt fraction made the core's heat flow follow the cell size, :func:`meltzone._core.mlt_physics.cmb_flux`);
  at the surface dT = T_top - T_s, eta of the top cell, and T_s balances that flux with eps sigma (T_s^4 - T_eq^4)
  (bare, or the grey atmosphere in solubility equilibrium with the melt, eps lagged by one step); a
  stagnant lid emerges where the viscosity shuts the convective flux off;
* mobile lid (``convection.regime = "mobile-lid"``): the viscosity at every face is evaluated no colder than
  the adiabat through the mid-mantle cell (this model's choice: the cold top is as mobile as the interior, so
  no lid forms; the top layer then behaves as the boundary-layer scheme's mobile top);
* stagnant lid: the mixing length at a face is at most the distance up to where the viscosity has risen by
  exp(a_rh) over the face's own (a_rh = convection.rheology_a, the rheological sublayer's scale of Solomatov &
  Moresi 2000, JGR 105:21795; the bound is this model's choice: a parcel cannot mix into a region much stiffer
  than itself, so a stagnant lid is a rigid boundary for the mantle under it, as the surface is; computed from
  the state at the start of each step, :func:`meltzone._core.mlt_physics.rigid_mixing_length`), at the faces
  nearer the surface than the core only (bounding the hot lower boundary layer too, whose viscosity also rises
  upward, let it grow conductively to ~500 km at 5 M_E and overturn at a grid-dependent time: the heat flow at
  4.5 Gyr was 294 and 192 TW at 256 and 512 nodes, then 163 and 161 TW, measured before the high-pressure
  activation volume; the grid test holds). With l tapering
  only to the surface the ~100 km conductive top carried the same flux whatever the rheology: a steadily
  convecting layer with an Arrhenius viscosity carried 8-14 times the stagnant-lid boundary-layer scaling, with
  the bound 1.8-2.1 times (tests/test_mixing_length_numerics.py); 1 M_E at 4.5 Gyr lost 33.5 TW through a
  stagnant lid against 31.0 TW through a mobile one (64 nodes), then 26.3 TW (26.3 at 256 and 512 nodes; 25.1
  TW against 29.7 mobile with the high-pressure activation volume, against 31.2 with the split of the lowest
  cells);
* heat pipe (stagnant lid, volcanism.enabled = "on", under a solid top cell): melt above 1% in a cell no deeper
  than volcanism.max_extraction_pressure_gpa leaves at the rate m (phi - 0.01) w / 10 kyr (w falls from 1 to 0
  across the rheological transition: a magma ocean convects instead) and erupts, each kg taking L + c_p (T - T_s)
  out of the cell (Moore & Webb 2013, Nature 501:501; from memory); this heat leaves through the surface. Without
  it, the stagnant mantle that the bound keeps hot held 30% melt under a 27 km lid at 5 M_E. The extraction time
  is short against the thermal evolution: 1 and 100 kyr give the same heat flow at 4.5 Gyr within 0.1% (1 and 5
  M_E, 64 nodes). Intrusions, crust, outgassing and the melt's depletion are not followed in this scheme (all
  extracted melt counts as erupted for its heat: an upper bound of the pipe). The history records the pipe's power
  (``volcanic_heat_flow``, not in ``surface_heat_flow``, as in the boundary-layer scheme) and the melt it extracts
  as the volume of crust it would make (``melt_production``, m^3/s at volcanism.crust_density_kg_m3), from which
  the summary takes when volcanism ends and its rates;
* radiogenic heating per cell by mass (the same isotope table).

Time stepping: backward Euler with Newton on the tridiagonal Jacobian (conservative: the energy closure is the
Newton tolerance), adaptive steps with a local-error estimate (ERROR_FRACTION x run.max_temperature_step_k per
step), a per-cell bound of run.max_temperature_step_k on dT and MAX_MELT_STEP on dphi per step. Newton starts
from the linear predictor, stops on its update or on the error left after it estimated from the contraction
rate, takes the slopes of the convective flux at an excess of at least 1e-3 K while its updates are large (at
the onset of convection the slope vanishes and a front would otherwise be found one cell per iteration) and,
once the updates have converged and only the step's energy balance is left to close, at an excess of at most
10 times the last update (a lava world's magma ocean carries ~1e-8 K), and
treats a non-positive temperature iterate as a failed step; a step that needed more than SLOW_NEWTON iterations
does not let the next one grow (the constants in :mod:`meltzone._core.implicit`). Measured for 5 M_E over 10 Gyr
at 256 nodes: 4.0 Newton iterations per accepted step and 172 rejected steps, against 5.7 and 395 before (in a
later version, with the current curves, outer faces and CMB layer: 4.4 per accepted step with the rejected steps'
included, 2830 accepted and 819 rejected steps; 2395 and 648 before the outer faces and the CMB layer).

Outer cells: the nodes at the CMB and at the surface carry half cells; the mean of a half cell lies at its
centroid, a quarter of the node spacing from the boundary, so the outer faces' conduction distance (and the
boundary layers' cap) is that quarter and the faces next to them take three quarters (``OUTER_CENTROID``; with the
node distances a conductive lid carried half a cell too much and its heat flow converged only to first order).

Upper boundary layer (off by default, ``TOP_LEVELS`` = 0; the numbers below with it set to 4): the scheme can add
TOP_LEVELS = 4 nodes between the interior's last two mantle nodes, at
depths d/2, d/4, d/8 and d/16 of that top spacing d (which the interior already makes 1/8 of its body's spacing),
so that the top cell is 1/128 of the body's spacing (70 m at 256 nodes for 5 M_E). Without them the conductive
lid that grows under the surface once the top leaves the liquid (~1 km thick at 5-20 Myr for 5 M_E) sat inside the
top half cell up to 512 nodes, the whole upper mantle's profile below it followed the cell size (at 2.25 km depth
and 20 Myr 1672, 1649, 1628 K at 256, 512, 1024 nodes) and the 5 M_E surface magma-ocean end moved 22.8, 17.3,
7.9 Myr; with them 8.18, 7.90, 7.61 Myr (measured; two more levels move it by < 0.1%). In the light cells of the
resolved lid the per-step bounds on dT and dphi and the local-error estimate count by the cell's mass against
the cell below the refinement (``M_TOP_CELLS``; this model's choice: the lid's thin cells freeze and re-melt
near phi_c in bursts, and with the full bounds the 5 M_E, 10 Gyr run took 3.5 times the steps). Why it is off:
those bursts make the regime flip (11 times for 5 M_E at 256 nodes, against once without), the mass-criterion end
of 5 M_E moves 2.2% from 256 to 512 nodes (1.2% without), 10 M_E does not converge with it (43.0 and 75.3 Myr),
the kernel departs from the plain reference by 7.9e-3 in the lid's cells (2 M_E, 100 kyr) and the 5 M_E, 10 Gyr
run takes 1.6 times as long. Re-measured with the CMB refinement and the current Newton solver: the 5 M_E
surface end 8.85, 8.40, 8.20, 8.08 Myr at 128-1024 nodes (2.4% from 256 to 512), 10 M_E 8.57 and 8.42 Myr (1.7%),
1 M_E 4.91 and 4.89 Myr, the regime flipping 3 times for 5 M_E at 256 nodes (once at 512); but the light cells'
mass-weighted bounds let the kernel depart from the plain reference by up to 1.9 (relative) in the top cells of
a 1 M_E stagnant lid within 100 kyr, and with the full bounds the 5 M_E, 10 Gyr run takes 10,644 accepted and
5,233 rejected steps (5 times as many, 2.5 s). Still off.

Lower boundary layer (on, ``BOTTOM_LEVELS`` = 4, ``LOWER_SPLIT`` = 4, ``LOWER_ZONE`` = 0.05): BOTTOM_LEVELS nodes
between the interior's first two mantle nodes, at heights d/16, d/8, d/4 and d/2 above the CMB of that bottom
spacing d (which the interior already makes 1/8 of its body's), so that the first spacing above the CMB is 1/128
of the body's and the hot lower boundary layer, in which the basal melt layer freezes last, is resolved by the
cells rather than by the CMB face's boundary-layer law; then every mantle cell whose top lies within the lowest 5%
of the mantle's thickness is split into four equal cells (the first spacing is then 1/512 of the body's, 35 m at
256 nodes for 5 M_E, and the CMB half cell half of that; the core's nodes are left alone). Why the split: near the
CMB the grid is graded geometrically (spacings d/16 .. d, then the interior's 1/8, 1/4, 1/2 of its body's), so the
spacing there grows in proportion to the height above the CMB, which is also the mixing length; doubling the nodes
halves every spacing but keeps that ratio, and the end of the basal layer drifted by a constant 1.0-1.2% per
doubling (5 M_E 2.234, 2.257, 2.283, 2.309 Gyr at 128-1024 nodes; 10 M_E 2.194, 2.216, 2.240, 2.267 Gyr; 1 M_E
1.451, 1.464, 1.470, 1.475 Gyr), with the CMB heat flow 1% lower and the core 2-3 K warmer per doubling; the
surface refinement did not change it (TOP_LEVELS = 4: 2.233, 2.257, 2.284 Gyr), and uniform refinement moved it by
0.3% from 1024 to 1448 nodes (2.309 and 2.316 Gyr). The split keeps the spacing-to-height ratio fixed too, only
four times smaller, so it does not restore convergence in the node count; it cut the drift about tenfold (10 Gyr,
mobile lid, defaults; measured): the basal layer ends at 1.4795, 1.4823, 1.4828 Gyr (1 M_E, 128-512 nodes),
2.3352, 2.3374, 2.3386, 2.3404 Gyr (5 M_E, 128-1024), 2.3005, 2.3049, 2.3061 Gyr (10 M_E), 2.6277, 2.6284, 2.6302
Gyr (15 M_E): 0.03-0.19% per doubling, not yet shrinking. Splitting the lowest 300 km of 5 M_E twofold, fourfold,
eightfold gives 2.3200, 2.3371, 2.3405 Gyr at 256 nodes (the lowest 100 km fourfold 2.3366), so the limit lies
near or a little above 2.34 Gyr. The rheological transition (the CMB half cell leaving phi_c) 51.29, 51.36, 51.37
Myr (1 M_E), 110.3, 112.2, 112.9, 113.1 Myr (5 M_E; before 85, 100, 106), 112.2, 115.6, 116.7 Myr (10 M_E), 176.7,
180.1, 181.2 Myr (15 M_E). Zones of 3%, 5% and 10% give the 5 M_E end 2.3365, 2.3374, 2.3372 Gyr at 256 nodes and
2.3391, 2.3386, 2.3398 Gyr at 512, the transition 112.2, 112.2, 112.1 Myr; but the basal layer's largest
thickness, reached at its separation from the surface melt within the first kyr (a tangency), 2205, 2114, 1903 km
(2148, 2114, 2124, 2101 km at 128-1024 nodes with 5%), and the 5 M_E surface magma-ocean end, which drifts along
phi_c for ~10 Myr (see "Grid convergence"), 14.9, 13.9, 7.0 Myr. The levels alone are converged (4, 6, 8 levels at
256 nodes before the split: 2.257, 2.263, 2.264 Gyr); without levels or split the end was first order in the
bottom spacing (5 M_E 2.04, 2.16, 2.23 Gyr). The cost: 351 cells at 256 nodes for 5 M_E instead of 294, ~20% more
CPU time (measured in one process). The bottom cells' step bounds count in full (counted by their mass, as the top
refinement's, the steps rose). Halving run.max_temperature_step_k moved the 5 M_E end by 0.1% (256 and 512 nodes,
before the split).

History: regime 0 (magma ocean) while the top of the convecting mantle is above phi_c, else the configured solid
regime. ``top_melt_fraction`` (the regime's melt fraction) is the melt fraction at the surface of the two-phase
isentrope through the top convecting cell (the highest cell whose upper face carries more heat by convection than
by conduction; the top cell itself is never taken), i.e. the convecting mantle's with the upper boundary layer
taken away: the boundary-layer scheme's definition (its regime follows the isentrope's melt fraction at the
top). The top cell's own melt fraction is not grid independent: the half cell at r = R lies inside the upper
boundary layer once that is resolved (the material at r = R is at the surface temperature in the continuum
limit), and the mixing length at its lower face is a quarter of a cell, so the cell freezes when the boundary
layer outgrows it; measured, the top cell leaving phi_c at 256, 512 and 1024 nodes: 1 M_E 0.96, 0.37, 0.17 Myr,
5 M_E 3.8, 3.2, 1.5 Myr, 10 M_E 5.2, 5.2, 3.5 Myr (with the node distances at the outer faces 1 M_E 1.55, 0.89,
0.68 Myr). ``upper_temperature`` = potential temperature T / f of the top convecting cell, counting the top cell
when its boundary layer is thinner than the half cell; ``lid_thickness`` (stagnant lid) = depth of the lid's
base, where the convective share of the face flux equals the conductive one, ln(convective / conductive)
interpolated in radius between that cell's upper face and the face above
(:func:`meltzone._core.implicit.lid_base`; as the upper face's depth, 1 M_E at 4.5 Gyr gave 207, 199, 190 km at
64, 256, 512 nodes, now 199, 190, 190 km); ``switch_times["rheological_switch"]`` = first recorded time at
which no cell is above phi_c.

Grid convergence (measured with ``benchmarks/convergence_mlt.py``, mobile lid; the numbers before the surface
refinement at 64, 128, 256, 512, 1024 nodes unless said, with it at 256, 512, 1024; all in earlier versions,
before the split of the lowest cells, unless said: for the current grid see "Lower boundary layer" and the tests).
The bulk of the magma ocean passes the rheological transition within ~1-3 kyr and this converges: the time at
which less than 1% of the mantle mass is above phi_c, 5 M_E: 1.710, 1.771, 1.798, 1.819, 1.835 kyr (with the
refinement 1.806, 1.844, 1.856 kyr); with the split of the lowest cells that 1% falls on a plateau, 4.88, 4.89,
3.45, 4.07 kyr at 128-1024 nodes: from 2 to 8 kyr the mass above phi_c is the basal layer's (0.7% falling to 0.3%)
plus a shallow layer's under the surface (0.4-0.7%, in steps as single cells pass phi_c), while 2% converges
(1.744, 1.778, 1.771, 1.783 kyr). The surface magma ocean's end (the regime's isentrope leaving phi_c), 1 M_E:
9.40, 9.00, 5.43, 4.86, 4.80 Myr (with the refinement 4.83 and 4.80 Myr at 512 and 1024 nodes, 0.7%). 5 M_E: 8.2,
12.8, 22.3, 17.0, 7.8 Myr before the refinement (the conductive lid inside the top half cell, see "Upper boundary
layer"); with it 8.18, 7.90, 7.61 Myr (3.5% and 3.6% per doubling, runs to 25 Myr): still short of 2%, because the
regime's melt fraction drifts along phi_c (~0.008 per Myr) and the upper mantle's profile still moves by ~0.005 in
phi per doubling. 10 M_E is not converged with it either (43.0 and 75.3 Myr at 256 and 512 nodes, runs to 200 Myr;
not diagnosed). The 1 M_E time of less than 1% above phi_c falls on a plateau of ~1-1.4% of the mantle mass (1.35,
2.24, 2.98, 2.38, 1.55 Myr), and so does the reported ``magma_ocean_end_yr`` (which needs both; with the
refinement 2.26 and 1.55 Myr at 512 and 1024 nodes). The basal layer's edges at fixed times converge (1 M_E, top
at 40 kyr to 1 Myr: within 3 km from 256 to 1024 nodes, cells of 11 to 3 km; the core's heat flow at 1 Myr 3.3e14,
3.7e14, 3.6e14 W), but its separation is a tangency of T - T_sol with zero: 1 M_E 33.9, 33.5, 32.9, 30.0, 31.2
kyr, its largest thickness (reached then) 965, 960, 963, 1063, 1006 km; 5 M_E 530 kyr within 0.2% and 438, 439,
423, 427, 425 km (with the refinement 534, 534, 536 kyr and 425, 452, 436 km). The last melt (the basal layer's
freezing) moved by 4.7% and 2.4% (1 M_E, 128-512 nodes), 4.0% and 2.8% (5 M_E), 7.6% and 5.9% (10 M_E) in an
earlier version without the CMB refinement (see "Lower boundary layer" for the current numbers); with the node
distances at the outer faces and the cell's melt fraction at the CMB 13.9% and 11.3% (5 M_E), 13.6% and 10.7% (10
M_E). The last cell above phi_c (``rheological_transition_yr``) is, with the CMB refinement, the CMB half cell: a
film of metres to tens of metres that the core keeps above phi_c (1 M_E 47.9, 48.9, 49.3 Myr and 5 M_E 85.1,
100.4, 106.2 Myr at 128, 256, 512 nodes; with the split 51.29, 51.36, 51.37 and 110.3, 112.2, 112.9 Myr, tied to
the core's cooling, not to the film's size); without it, one cell on a plateau at phi_c under the surface (1 M_E
8.0, 7.8, 5.7, 22.2, 29.5 Myr; 5 M_E 4.7, 7.4, 20.2, 15.9, 12.2 Myr; with the surface refinement 5 M_E 13.7, 12.9,
12.2 Myr, 6% per doubling). Halving the step tolerance (run.max_temperature_step_k) moved every event by < 1%
except the basal layer's largest thickness (1-6%) before the refinement. Tried without effect on the top cell's
freezing: mixing lengths at the geometric mean of the two nodes' distances to the boundary, and the node distance
at the faces next to the outer half cells. """

from __future__ import annotations

import math

import numpy as np

from .._core import layout as k
from ..constants import GYR, YEAR
from ..errors import ConfigError, ConvergenceError
from .boundary_layer import build_inputs, complete_core, initial_temperatures, padded_parameters
from .contract import INTEGER_INTERVAL_FIELDS, INTERVAL_FIELDS, SERIES, History, InStep, MantleGrid
from .schemes import KERNEL_ERRORS, Scheme, kernel_failure

#: largest melt-fraction change of any cell in one step (this model's choice)
MAX_MELT_STEP = 0.05
#: local-error tolerance per step as a fraction of run.max_temperature_step_k (this model's choice)
ERROR_FRACTION = 0.05
#: Newton converges when no update (or the error left after it) exceeds NEWTON_FRACTION of the local-error
#: tolerance, and at least NEWTON_TOL_K [K] (Hairer & Wanner 1996, Solving ODEs II, sec. IV.8, take a fraction
#: 1e-1 to 1e-2 of it; from memory). This model's choice, a safer 1e-3 (with 1e-2 the 1 M_E basal layer's
#: separation, an ill-conditioned event, differed by 5.2% between 256 and 512 nodes); before, 1e-6 K for every
#: tolerance, which on a steam-capped lava world held the steps at ~200 yr (1e-9 K sat at the noise of the finite
#: differences). The kernel also requires each step's global energy balance to close (meltzone._core.implicit)
NEWTON_FRACTION = 1.0e-3
NEWTON_TOL_K = 1.0e-6
MAX_NEWTON = 30
#: shortest step [s]
MIN_STEP = 1.0e-3
#: first step [s]; the controller grows it
FIRST_STEP = 1.0
#: narrowest melt-fraction width of the rheological transition in this scheme (convection.rheology_blend_width
#: below it is widened to it). This model's choice; smooth transitions of similar width are usual in mixing-length
#: magma-ocean models (Bower et al. 2018, from memory). Measured at 256 nodes without it (the configured 0.05):
#: 1, 5 and 10 M_E (mobile lid) and 5 M_E (stagnant lid) run through over 10 Gyr, and the 1 M_E rheological
#: transition converges better (22.4, 20.6, 19.6 Myr at 256, 512, 1024 nodes against 66, 57, 49), but the 5 M_E
#: benchmark takes 22% more Newton iterations and the kernel departs from the plain reference by 5.5e-3 in T
#: (1 M_E stagnant lid, first kyr; 3e-4 with it), so it is kept
MIN_BLEND = 0.15
#: most cells the scheme takes: the history holds T and phi per cell and step (this model's choice)
MAX_CELLS = 2048
PROGRESS_STEPS = 100
#: distance of an outer half cell's centroid from its boundary, in node spacings (a quarter: the mean of a linear
#: profile over the half cell; common practice for cell-centred finite volumes, Patankar 1980, ch. 4, from
#: memory). With a half (the node's distance) the conductive lid carried an extra half cell: measured 1 M_E
#: surface heat flow at 6 Myr 1.61, 1.93, 2.04e15 W at 256, 512, 1024 nodes, with the quarter 1.98, 2.14, 2.17e15 W
OUTER_CENTROID = 0.25
SWITCH = "rheological_switch"
#: extra halvings of the top node spacing in this scheme's cells (module docstring, "Upper boundary layer"; off:
#: with 4, measured, the 5 M_E surface magma-ocean end converges to 3.5% per doubling instead of 24%, 3 and 4
#: levels agree within 0.1%, but the regime flips 11 times at 256 nodes, the 5 M_E mass-criterion end moves 2.2%
#: from 256 to 512 nodes and the 5 M_E, 10 Gyr run costs 1.6 times as much; experimental until those are solved)
TOP_LEVELS = 0
#: extra halvings of the bottom node spacing (module docstring, "Lower boundary layer"; this model's choice)
BOTTOM_LEVELS = 4
#: every cell of the lowest LOWER_ZONE of the mantle's thickness (after the levels) is split into LOWER_SPLIT
#: equal cells (module docstring, "Lower boundary layer"; this model's choice; measured: zones of 3, 5 and 10%
#: give the same basal-layer end and rheological transition within 0.1%)
LOWER_SPLIT = 4
LOWER_ZONE = 0.05


def refined_interior(interior, levels=TOP_LEVELS, bottom=BOTTOM_LEVELS, split=LOWER_SPLIT, zone=LOWER_ZONE):
    """The interior with ``levels`` more mantle nodes between the last two, at depths d/2 .. d/2^levels of their
    spacing d (the interior's top spacing, 1/8 of its body's), and ``bottom`` more between the first two, at
    heights d/2^bottom .. d/2 above the CMB of their spacing d (also 1/8 of the body's); then every mantle cell
    whose top lies within ``zone`` of the mantle's thickness above the CMB split into ``split`` equal cells. Every
    node array is interpolated linearly in radius (phase: the outer node's for the levels, the lower node's for
    the split)."""
    import dataclasses

    if levels <= 0 and bottom <= 0 and (split <= 1 or zone <= 0.0):
        return interior
    r = interior.r
    c = interior.cmb_index
    top_r = r[-1] - (r[-1] - r[-2]) * 0.5 ** np.arange(1, levels + 1)
    bottom_r = r[c] + (r[c + 1] - r[c]) * 0.5 ** np.arange(bottom, 0, -1)
    names = ("r", "m", "P", "rho", "g", "T_ref", "adiabat")
    out = {}
    for name in names:
        a = getattr(interior, name)
        out[name] = np.concatenate([a[:c + 1], np.interp(bottom_r, r[c:c + 2], a[c:c + 2]), a[c + 1:-1],
                                    np.interp(top_r, r[-2:], a[-2:]), a[-1:]])
    phase = interior.phase
    out["phase"] = np.concatenate([phase[:c + 1], np.repeat(phase[c], bottom), phase[c + 1:-1],
                                   np.repeat(phase[-1], levels), phase[-1:]])
    rm = out["r"][c:]  # the mantle's nodes (the CMB radius is also the core's last node, c - 1: left alone)
    low = np.flatnonzero(rm[1:] - rm[0] <= zone * (rm[-1] - rm[0])) if split > 1 else np.zeros(0, dtype=int)
    if low.size:
        added = (rm[low, None] + np.diff(rm)[low, None] * np.arange(1, split) / split).ravel()
        radii = np.sort(np.concatenate([rm, added]))
        below = np.searchsorted(rm, radii, "right") - 1
        out["phase"] = np.concatenate([out["phase"][:c], out["phase"][c:][below]])
        for name in names:
            out[name] = np.concatenate([out[name][:c], np.interp(radii, rm, out[name][c:])])
    return dataclasses.replace(interior, **out)


def refined_curves(curves, interior, fine) -> dict:
    """The melting curves (:func:`meltzone.melting.node_curves` on the interior's mantle nodes) on the refined
    nodes: linear in radius between the interior's nodes (the added nodes lie between two of them, within 1/8
    of a node spacing of the surface or of the CMB, or in the split lowest cells)."""
    r = interior.r[interior.mantle]
    rf = fine.r[fine.mantle]
    out = dict(curves)
    for name in ("solidus", "liquidus", "aux1", "aux2"):
        out[name] = np.ascontiguousarray(np.interp(rf, r, np.asarray(curves[name], dtype=np.float64)))
    return out


def build_faces(interior, grid) -> np.ndarray:
    """Face rows F_* (faces 0 = CMB .. n = surface) from the interior and the cell grid."""
    it = interior
    ms = it.mantle
    r = grid[k.G_R]
    n = len(r)
    rn = it.r[ms]
    rf = np.concatenate([[r[0]], 0.5 * (r[1:] + r[:-1]), [r[-1]]])
    faces = np.zeros((k.N_F, n + 1))
    faces[k.F_R] = rf
    faces[k.F_A] = 4.0 * math.pi * rf ** 2
    faces[k.F_RHO] = np.interp(rf, rn, it.rho[ms])
    faces[k.F_G] = np.interp(rf, rn, it.g[ms])
    faces[k.F_P] = np.interp(rf, rn, it.P[ms])
    faces[k.F_L] = np.minimum(rf - r[0], r[-1] - rf)
    faces[k.F_LM] = faces[k.F_L]
    faces[k.F_DR, 1:n] = np.diff(r)
    # the outer cells are half cells whose mean lies at their centroid, a quarter of the node spacing from the
    # boundary (linear profile): the distances at the outer faces and at the faces next to them are measured from
    # it (module docstring, "Outer cells")
    faces[k.F_DR, 0] = OUTER_CENTROID * (r[1] - r[0])
    faces[k.F_DR, n] = OUTER_CENTROID * (r[-1] - r[-2])
    faces[k.F_DR, 1] = (1.0 - OUTER_CENTROID) * (r[1] - r[0])
    faces[k.F_DR, n - 1] = (1.0 - OUTER_CENTROID) * (r[-1] - r[-2])
    f = grid[k.G_F]
    faces[k.F_RATIO] = 1.0
    faces[k.F_RATIO, 1:n] = f[1:] / f[:-1]
    faces[k.F_F] = np.interp(rf, r, f)
    return faces


def settings(spec) -> np.ndarray:
    m = np.zeros(k.N_M)
    m[k.M_ERR] = ERROR_FRACTION * spec.run.max_temperature_step_k
    m[k.M_DPHI] = MAX_MELT_STEP
    m[k.M_DT_CELL] = spec.run.max_temperature_step_k
    m[k.M_NEWTON_TOL] = max(NEWTON_TOL_K, NEWTON_FRACTION * m[k.M_ERR])
    m[k.M_MAX_NEWTON] = MAX_NEWTON
    m[k.M_MOBILE] = 1.0 if spec.convection.regime == "mobile-lid" else 0.0
    m[k.M_MIN_STEP] = MIN_STEP
    m[k.M_TOP_CELLS] = TOP_LEVELS
    return m


def enthalpy(temp, phi, par) -> np.ndarray:
    """h = c_p T + L phi [J/kg]."""
    return par[k.P_CM] * np.asarray(temp) + par[k.P_LATENT] * np.asarray(phi)


def initial_x(spec, inputs) -> np.ndarray:
    """(E_c, h_0 .. h_{n-1}) at the start: the boundary-layer scheme's initial temperatures on the adiabat."""
    from .. import melting
    from .._core.physics import core_energy

    tu, tc = initial_temperatures(spec, inputs)
    grid = inputs.grid
    temp = tu * grid[k.G_F]
    phi = melting.melt_fraction(temp, grid[k.G_TSOL], grid[k.G_TLIQ], grid[k.G_AUX1], grid[k.G_AUX2],
                                inputs.law)
    x = np.empty(grid.shape[1] + 1)
    x[0] = core_energy(tc, grid, inputs.core, inputs.par) if inputs.core[k.C_W].sum() > 0 else 0.0
    x[1:] = enthalpy(temp, phi, inputs.par)
    return x, tc


def integrate(spec, inputs, faces, progress=None, history_rows=2048):
    """Run the implicit integrator to the end time, growing the buffers; returns (hist, temps, phis, state)."""
    from .._core.implicit import integrate as step_all

    n = inputs.grid.shape[1]
    mset = settings(spec)
    x, tc = initial_x(spec, inputs)
    x_prev = x.copy()
    state = np.zeros(k.N_MS)
    state[k.MS_H] = FIRST_STEP
    state[k.MS_TC] = tc
    hist = np.zeros((history_rows, k.N_MH))
    temps = np.zeros((history_rows, n))
    phis = np.zeros((history_rows, n))
    max_steps = spec.run.max_steps
    chunk = PROGRESS_STEPS if progress is not None else max_steps
    while True:
        done = max(int(state[k.MS_N_H]) - 1, 0)
        try:
            status = step_all(state, x, x_prev, inputs.grid, faces, inputs.core, inputs.iso, inputs.par,
                              inputs.law, mset, hist, temps, phis, min(chunk, max_steps - done))
        except KERNEL_ERRORS as exc:
            raise kernel_failure(spec, "mixing-length", exc, hist[:, k.MH_T]) from exc
        done = int(state[k.MS_N_H]) - 1
        if progress is not None:
            progress(state[k.MS_T])
        if status == k.STATUS_DONE:
            break
        if status == k.STATUS_HISTORY_FULL:
            hist, temps, phis = (np.concatenate([a, np.zeros_like(a)]) for a in (hist, temps, phis))
        elif status == k.STATUS_MAX_STEPS:
            if done >= max_steps:
                raise ConvergenceError(
                    f"{spec.planet.name}: the mixing-length evolution reached run.max_steps = {max_steps} at "
                    f"model time {state[k.MS_T] / GYR:.4g} Gyr; raise run.max_steps or "
                    "run.max_temperature_step_k")
        elif status == k.STATUS_STEP_TOO_SMALL:
            raise ConvergenceError(
                f"{spec.planet.name}: the mixing-length step collapsed (Newton did not converge) at model time "
                f"{state[k.MS_T] / YEAR:.4g} yr; raise run.max_temperature_step_k or lower interior.mantle_nodes")
    n_h = int(state[k.MS_N_H])
    return hist[:n_h].copy(), temps[:n_h].copy(), phis[:n_h].copy(), state


def intervals_of(phis, grid) -> dict:
    from .._core.implicit import all_intervals

    rows = max(4 * phis.shape[0], 64)
    while True:
        iv = np.zeros((rows, k.N_I))
        n_iv = all_intervals(phis, grid, iv)
        if n_iv >= 0:
            break
        rows *= 4
    out = {name: iv[:n_iv, k.INTERVAL_COLUMNS.index(name)].copy() for name in INTERVAL_FIELDS}
    for name in INTEGER_INTERVAL_FIELDS:
        out[name] = out[name].astype(np.int64)
    return out


def run(spec, interior, curves, progress=None, *, history_rows=2048) -> History:
    """Evolve one planet with the mixing-length scheme and return its :class:`History`."""
    fine = refined_interior(interior)
    n = fine.r.size - fine.cmb_index  # the cells with the refinement
    if n > MAX_CELLS:
        raise ConfigError(f"interior.mantle_nodes = {spec.interior.mantle_nodes} gives {n} mantle cells, more than "
                          f"the mixing-length scheme takes ({MAX_CELLS}); lower interior.mantle_nodes")
    inputs = build_inputs(spec, fine, refined_curves(curves, interior, fine))
    inputs.par[k.P_BMO] = 0.0  # no reservoir here: the basal layer is whatever the resolved profile gives
    inputs.par[k.P_BLEND] = max(inputs.par[k.P_BLEND], MIN_BLEND)
    faces = build_faces(fine, inputs.grid)
    hist, temps, phis, state = integrate(spec, inputs, faces, progress, history_rows)
    column = {name: j for j, name in enumerate(k.MLT_HISTORY_COLUMNS)}
    series = {name: hist[:, column[name]].copy() for name in SERIES if name in column}
    phi_c = float(inputs.par[k.P_PHI_C])
    solid = k.REGIME_STAGNANT_LID if spec.convection.regime == "stagnant-lid" else k.REGIME_MOBILE_LID
    series["regime"] = np.where(series["top_melt_fraction"] > phi_c, k.REGIME_MAGMA_OCEAN, solid).astype(np.int8)
    if inputs.par[k.P_VOLC] > 0.5 and spec.convection.regime == "stagnant-lid":
        # the heat pipe's power and the melt it extracts, as the volume of crust it would make (the
        # boundary-layer scheme's unit); this scheme follows neither the crust nor the outgassing
        series["volcanic_heat_flow"] = hist[:, column["pipe_power"]].copy()
        series["melt_production"] = hist[:, column["pipe_extraction"]] / inputs.par[k.P_RHO_CRUST]
    de = series["stored_energy"][0] - series["stored_energy"]
    scale = max(float(np.max(np.abs(de))), 1.0)
    series["closure_error"] = (de - series["heat_out_minus_radiogenic"]) / scale
    time = hist[:, k.MH_T].copy()
    below = np.flatnonzero(np.max(phis, axis=1) <= phi_c)
    grid = inputs.grid
    history = History(
        scheme=SCHEME.name, time=time, series=series, temperature=temps, melt_fraction=phis,
        intervals=intervals_of(phis, grid),
        grid=MantleGrid(radius=grid[k.G_R].copy(), pressure=grid[k.G_P].copy(), mass=grid[k.G_W].copy(),
                        solidus=grid[k.G_TSOL].copy(), liquidus=grid[k.G_TLIQ].copy()),
        critical_melt_fraction=phi_c,
        switch_times={SWITCH: float(time[below[0]]) if below.size else None},
        n_rejected=int(state[k.MS_N_REJ]),
        scheme_data={"grid": grid, "core": inputs.core, "iso": inputs.iso, "par": inputs.par,
                     "law": np.int64(inputs.law), "core_energy": hist[:, k.MH_EC].copy(),
                     "newton_iterations": hist[:, k.MH_NEWTON].copy(),
                     "upper_cell": hist[:, k.MH_UPPER_CELL].astype(np.int64),
                     "newton_iterations_all": np.int64(state[k.MS_N_NEWTON])})
    history.evaluator = Evaluator(history)
    return history


class Evaluator:
    """The state inside a step: the enthalpy of every cell and the core's stored heat interpolated linearly in
    time between the recorded steps, then inverted (so that event times can be refined)."""

    def __init__(self, history: History):
        d = history.scheme_data
        self.grid = np.ascontiguousarray(d["grid"], dtype=np.float64)
        self.par = padded_parameters(np.ascontiguousarray(d["par"], dtype=np.float64))
        self.core = complete_core(np.ascontiguousarray(d["core"], dtype=np.float64), self.par)
        self.law = int(d["law"])
        self.ec = np.asarray(d["core_energy"], dtype=np.float64)
        self.t = history.time
        self.h = enthalpy(history.temperature, history.melt_fraction, self.par)
        self.tc = np.asarray(history["core_temperature"], dtype=np.float64)
        # the top convecting cell per step (a file without it: the top cell)
        n = self.grid.shape[1]
        self.upper = np.asarray(d.get("upper_cell", np.full(len(self.t), n - 1)), dtype=np.int64)

    def at(self, t: float) -> InStep:
        from .._core.implicit import states_at
        from .._core.mlt_physics import surface_adiabat_state
        from .._core.physics import CORE, _invert

        times = self.t
        if not times[0] <= t <= times[-1]:
            raise ValueError(f"time {t:g} s is outside the run ({times[0]:g} - {times[-1]:g} s)")
        s = max(int(np.searchsorted(times, t, side="left")), 1)
        if len(times) == 1:
            w, s = 0.0, 1
            h = self.h[0].copy()
            ec, tc0 = self.ec[0], self.tc[0]
        else:
            w = (t - times[s - 1]) / (times[s] - times[s - 1])
            h = (1.0 - w) * self.h[s - 1] + w * self.h[s]
            ec = (1.0 - w) * self.ec[s - 1] + w * self.ec[s]
            tc0 = (1.0 - w) * self.tc[s - 1] + w * self.tc[s]
        n = self.grid.shape[1]
        temp = np.empty(n)
        phi = np.empty(n)
        states_at(np.ascontiguousarray(h), self.grid, self.law, self.par, temp, phi)
        tc = tc0
        if self.core[k.C_W].sum() > 0.0:
            tc, _ = _invert(CORE, float(ec), 0.0, 0.0, self.grid, self.core, self.par, self.law, float(tc0), 0.0)
        iu = int(self.upper[s])  # the top convecting cell at the end of the step
        regime_phi = surface_adiabat_state(float(h[iu]), float(temp[iu]), iu, self.grid, self.law, self.par)[1]
        return InStep(temperature=temp, melt_fraction=phi, regime_melt_fraction=float(regime_phi),
                      centre_freezing_margin_k=float(self.core[k.C_TMELT, 0] - tc * self.core[k.C_F, 0]))


SCHEME = Scheme(name="mixing-length",
                description="radially resolved mantle: enthalpy cells with mixing-length convection (finds melt "
                            "layers; slower)",
                run=run, evaluator=Evaluator)
