using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling;

/// <summary>
/// Chooses a replica-exchange ladder (<see cref="SamplingSettings.SwapInterval"/>) from a target swap acceptance: the
/// given temperatures stay rungs, and between two of them the fewest geometrically spaced rungs are added for which every
/// neighbouring pair's predicted acceptance reaches the target. The prediction is exact for lines and radial pairs (from
/// the energy distribution by quadrature) and harmonic for sites (a three-dimensional harmonic well's, which knows nothing of
/// other basins or anharmonicity: read the measured <see cref="Reports.ReplicaExchangeDiagnostics.SwapAcceptance"/>).
/// </summary>
public static class TemperatureLadders
{
    /// <summary>The default target swap acceptance, 0.3 (common practice, no source; 0.2 to 0.4 is the range usually recommended).</summary>
    public const double DefaultTargetSwapAcceptance = 0.3;

    /// <summary>The ladder for a line or radial pair, from its exact energy distribution.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="temperatures">At least two temperatures, no duplicates (any order).</param>
    /// <param name="targetSwapAcceptance">The least predicted acceptance between neighbouring rungs, strictly between 0 and 1.</param>
    public static LadderPlan ForPair<TPotential>(PairLandscape<TPotential> landscape, IEnumerable<Temperature> temperatures,
        double targetSwapAcceptance = DefaultTargetSwapAcceptance)
        where TPotential : struct, IPairPotential
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        var list = Check(temperatures, targetSwapAcceptance);
        return SwapAcceptance.ForPair(landscape).Plan(list, targetSwapAcceptance);
    }

    /// <summary>The ladder for a site, from a three-dimensional harmonic well's energy distribution.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape (checked; the harmonic prediction does not depend on its stiffness).</param>
    /// <param name="temperatures">At least two temperatures, no duplicates (any order).</param>
    /// <param name="targetSwapAcceptance">The least predicted acceptance between neighbouring rungs, strictly between 0 and 1.</param>
    public static LadderPlan ForSite<TPotential>(SiteLandscape<TPotential> landscape, IEnumerable<Temperature> temperatures,
        double targetSwapAcceptance = DefaultTargetSwapAcceptance)
        where TPotential : struct, IPairPotential
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        var list = Check(temperatures, targetSwapAcceptance);
        return SwapAcceptance.Harmonic3D(list.Min(t => t.ThermalEnergyInElectronVolts), list.Max(t => t.ThermalEnergyInElectronVolts))
            .Plan(list, targetSwapAcceptance);
    }

    private static List<Temperature> Check(IEnumerable<Temperature> temperatures, double target)
    {
        var list = TemperatureList.Check(temperatures);
        if (!(target > 0 && target < 1))
        {
            throw new System.ArgumentOutOfRangeException("targetSwapAcceptance", target, string.Create(CultureInfo.InvariantCulture,
                $"targetSwapAcceptance = {target:R} is out of range; valid: strictly between 0 and 1."));
        }
        TemperatureLadder.CheckLadder([.. list.Select(t => t.InKelvin).Order()], nameof(temperatures));
        return list;
    }
}
