using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Sampling;

namespace ThermalSampling.Reports;

/// <summary>What a replica-exchange ladder's swap tallies add to each rung's report: its diagnostics and warnings.</summary>
internal static class LadderSummary
{
    /// <summary>Below this swap acceptance a neighbouring pair of rungs is warned about (common practice, no source).</summary>
    internal const double LowSwapAcceptance = 0.05;

    /// <summary>Rung <paramref name="rung"/>'s swap diagnostics.</summary>
    internal static ReplicaExchangeDiagnostics Diagnostics(int rung, ImmutableArray<double> ladder, LadderTallies tallies)
    {
        bool top = rung == ladder.Length - 1;
        long attempts = top ? 0 : tallies.Attempts[rung];
        double? acceptance = top || attempts == 0 ? null : (double)tallies.Accepted[rung] / attempts;
        double? meanTrip = tallies.RoundTrips == 0 ? null : (double)tallies.RoundTripSteps / tallies.RoundTrips;
        return new ReplicaExchangeDiagnostics(rung, ladder, tallies.SwapInterval, acceptance, attempts, tallies.RoundTrips, meanTrip);
    }

    /// <summary>The rung's warnings followed by the ladder's: a sparse step up from this rung, and a ladder with no round trip.</summary>
    internal static ImmutableArray<Warning> Warnings(ImmutableArray<Warning> warnings, ReplicaExchangeDiagnostics d)
    {
        var c = CultureInfo.InvariantCulture;
        var list = warnings.ToBuilder();
        if (d.SwapAcceptance is double a && a < LowSwapAcceptance)
        {
            list.Add(new Warning(WarningCodes.SwapAcceptanceLow, string.Format(c,
                "Only {0:P1} of the swaps between {1:G6} K and {2:G6} K were accepted (fewer than {3:P0}): configurations rarely cross that step of the ladder. Add temperatures between them (or let the ladder be chosen automatically).",
                a, d.LadderInKelvin[d.Rung], d.LadderInKelvin[d.Rung + 1], LowSwapAcceptance)));
        }
        if (d.RoundTrips == 0)
        {
            list.Add(new Warning(WarningCodes.LadderNoRoundTrips, string.Format(c,
                "No configuration went from {0:G6} K to {1:G6} K and back during the recorded steps: the cold rungs may not have been fed from the hot ones, so barriers may not have been crossed. Run longer, add rungs, or raise the top temperature.",
                d.LadderInKelvin[0], d.LadderInKelvin[^1])));
        }
        return list.ToImmutable();
    }
}
