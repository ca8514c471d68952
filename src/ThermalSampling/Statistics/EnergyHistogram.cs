using System;
using System.Collections.Immutable;
using ThermalSampling.Persistence;

namespace ThermalSampling.Statistics;

/// <summary>
/// The histogram of a chain's potential energy V above a reference V_ref (the energy at the site's minimum, or the pair's
/// reference energy): <see cref="Bins"/> bins of width w = 2^⌊log₂(kT/8)⌋ eV from V_ref, a count below V_ref and a count
/// at or beyond the last bin's end. The width is a power of two, so histograms of the same landscape at different
/// temperatures share bin edges after merging neighbouring bins (what comparing and reweighting across temperatures
/// needs); 256 bins of at least kT/16 reach at least 16 kT above the reference.
/// </summary>
public sealed class EnergyHistogram
{
    /// <summary>The number of bins of width <see cref="BinWidthInElectronVolts"/>.</summary>
    public const int Bins = 256;

    /// <summary>Bins plus the counts below and beyond them.</summary>
    internal const int Slots = Bins + 2;

    private readonly long[] _counts = new long[Slots];
    private readonly double _scale;

    /// <param name="referenceInElectronVolts">V_ref, eV.</param>
    /// <param name="binWidthInElectronVolts">The bin width, eV (<see cref="BinWidthFor"/> of the chain's kT).</param>
    internal EnergyHistogram(double referenceInElectronVolts, double binWidthInElectronVolts)
    {
        ReferenceInElectronVolts = referenceInElectronVolts;
        BinWidthInElectronVolts = binWidthInElectronVolts;
        _scale = 1 / binWidthInElectronVolts;
    }

    /// <summary>The bin width for a chain at thermal energy kT: 2^⌊log₂(kT/8)⌋ eV.</summary>
    /// <param name="thermalEnergyInElectronVolts">kT, eV, positive and finite.</param>
    public static double BinWidthFor(double thermalEnergyInElectronVolts)
    {
        Internal.Preconditions.CheckPositive(thermalEnergyInElectronVolts, nameof(thermalEnergyInElectronVolts));
        return Math.ScaleB(1.0, Math.ILogB(thermalEnergyInElectronVolts / 8));
    }

    /// <summary>V_ref, the lower edge of the first bin, eV.</summary>
    public double ReferenceInElectronVolts { get; }

    /// <summary>The bin width w, eV (a power of two).</summary>
    public double BinWidthInElectronVolts { get; }

    /// <summary>Draws with V below V_ref.</summary>
    public long Below => _counts[0];

    /// <summary>Draws with V at or beyond V_ref + <see cref="Bins"/>·w.</summary>
    public long Beyond => _counts[Slots - 1];

    /// <summary>Draws per bin: bin i holds V_ref + i·w ≤ V &lt; V_ref + (i + 1)·w.</summary>
    public ImmutableArray<long> Counts => ImmutableArray.Create(_counts, 1, Bins);

    /// <summary>Every draw counted, including those below and beyond the bins.</summary>
    public long Total
    {
        get
        {
            long total = 0;
            foreach (long c in _counts)
            {
                total += c;
            }
            return total;
        }
    }

    /// <summary>Counts one draw of energy <paramref name="energy"/>, eV (the lane kernels' arithmetic, <c>LaneCounting.EnergySlot</c>).</summary>
    internal void Add(double energy)
    {
        double t = Math.FusedMultiplyAdd(energy - ReferenceInElectronVolts, _scale, 1.0);
        t = t < 1.0 ? 0.0 : t;
        _counts[t < Slots - 1 ? (int)t : Slots - 1]++;
    }

    /// <summary>Adds counts gathered elsewhere (<see cref="Slots"/> values: below, the bins, beyond).</summary>
    internal void AddCounts(ReadOnlySpan<long> counts)
    {
        for (int i = 0; i < Slots; i++)
        {
            _counts[i] += counts[i];
        }
    }

    internal void Save(StateWriter w) => w.Longs("EHIS", _counts);

    internal void Load(StateReader r) => r.Longs("EHIS", Slots).CopyTo(_counts, 0);
}
