using System;
using System.Collections.Immutable;
using System.Globalization;
using ThermalSampling.Landscapes;
using ThermalSampling.Persistence;
using ThermalSampling.Statistics;

namespace ThermalSampling.Sampling;

/// <summary>
/// What one chain leaves behind, in constant memory however long it ran: streaming moments of what it samples (the
/// separation of a pair, or the position of a particle among sites), batch means of each coordinate and of the potential
/// energy (and from them the energy's mean and variance over every draw), histogram counts, a histogram of the potential energy, proposal and acceptance counts,
/// and the state of its random stream after its last draw. The records of a temperature's chains, in chain order, are
/// what its report is built from (<see cref="TemperatureRecord"/>); they serialise exactly and merge exactly.
/// </summary>
/// <remarks>Read a record once its chain has finished (the samplers return only finished records).</remarks>
public sealed class ChainRecord
{
    private readonly BatchMeansStore[] _stores;
    private readonly DrawRecorder<double>? _keptSeparations;
    private readonly DrawRecorder<Position>? _keptPositions;
    private BlockedMomentAccumulator _separation;
    private CovarianceAccumulator _position;
    private ulong[] _stream = new ulong[4];

    internal ChainRecord(RecordLayout layout, int chain, double energyBinWidth)
    {
        Layout = layout;
        Chain = chain;
        _stores = new BatchMeansStore[layout.Coordinates + 1];
        for (int i = 0; i < layout.Coordinates; i++)
        {
            _stores[i] = new BatchMeansStore(layout.Samples, layout.MaxDiagnosticValues, layout.References[i]);
        }
        _stores[layout.Coordinates] = new BatchMeansStore(layout.Samples, layout.MaxDiagnosticValues, layout.EnergyReference);
        Bins = new BinCounter(layout.BinLower, layout.BinUpper, layout.Bins);
        Cumulants = new CumulantSums(layout.Coordinates, layout.Samples, layout.Waves);
        EnergyHistogram = new EnergyHistogram(layout.EnergyReference, energyBinWidth);
        Reweighting = new EnergyBinSums(layout.EnergyReference, EnergyBinSums.WidthFromCoarse(energyBinWidth), layout.Coordinates == 1 ? 2 : 9, layout.Samples);
        Shape = layout.Shape is null ? null : new ShapeCounter(layout.Shape);
        if (layout.Coordinates == 1)
        {
            _keptSeparations = new DrawRecorder<double>(layout.Samples, layout.Retained);
        }
        else
        {
            _keptPositions = new DrawRecorder<Position>(layout.Samples, layout.Retained);
        }
    }

    internal RecordLayout Layout { get; }

    /// <summary>The chain's index in its run (its random stream is the run's seed stream advanced by this many jumps).</summary>
    public int Chain { get; }

    /// <summary>1 for a pair (the separation), 3 for a particle among sites (the position).</summary>
    public int Coordinates => Layout.Coordinates;

    /// <summary>Recorded draws (burn-in excluded).</summary>
    public long Draws => Coordinates == 1 ? _separation.Count : _position.Count;

    /// <summary>Proposals made while recording: one per step for a Metropolis walk; for direct site draws, the envelope draws tried.</summary>
    public long Proposals { get; internal set; }

    /// <summary>Proposals accepted while recording (for direct pair draws, every draw).</summary>
    public long Accepted { get; internal set; }

    /// <summary>The frozen Metropolis proposal scale: a width in Å for pairs, a multiple of the smallest harmonic mode's RMS spread for sites; 0 for direct draws.</summary>
    public double ProposalScale { get; internal set; }

    /// <summary>Draws within one harmonic RMS spread of the confinement (sites; 0 for pairs).</summary>
    public long DrawsNearWall { get; internal set; }

    /// <summary>Draws outside the basin of the site's minimum (sites; 0 for pairs).</summary>
    public long DrawsOutsideBasin { get; internal set; }

    /// <summary>Draws per basin of the site's map (0 the site's, 1 … K the other minima in order, K + 1 the wall's; sites only, empty for pairs).</summary>
    public ImmutableArray<long> BasinCounts => [.. DrawsPerBasin];

    internal long[] DrawsPerBasin { get; set; } = [];

    /// <summary>The values summed per basin and group in <see cref="BasinSums"/>: the draws, u_x, u_y, u_z, u_x², u_y², u_z², u_xu_y, u_xu_z, u_yu_z.</summary>
    internal const int BasinSumValues = 10;

    /// <summary>
    /// Per basin label and group of draws (<see cref="EnergyBinSums.Groups"/> consecutive groups, for the jackknife): the
    /// draws and the sums of the displacement u from the record's reference (the site's minimum) and of its six products,
    /// label-major, <see cref="BasinSumValues"/> each. Empty when the site's map has one basin (every draw is then the
    /// whole run's) or for a pair.
    /// </summary>
    internal double[] BasinSums { get; set; } = [];

    /// <summary>
    /// Once the chain has finished: the draws per basin of a map of <paramref name="labels"/> labels, and those outside the
    /// site's basin, from the per-basin sums (each group's first value is its draws, exact in a double up to 2^53 draws), or
    /// every draw in the site's basin when the map has one basin and no sums were kept.
    /// </summary>
    internal void CountBasinDraws(int labels)
    {
        var counts = new long[labels];
        if (BasinSums.Length == 0)
        {
            counts[0] = Draws;
        }
        else
        {
            for (int l = 0; l < labels; l++)
            {
                for (int g = 0; g < EnergyBinSums.Groups; g++)
                {
                    counts[l] += (long)BasinSums[(l * EnergyBinSums.Groups + g) * BasinSumValues];
                }
            }
        }
        DrawsPerBasin = counts;
        DrawsOutsideBasin = Draws - counts[0];
    }

    /// <summary>Adds recorded draw <paramref name="index"/>, displaced by (<paramref name="ux"/>, <paramref name="uy"/>, <paramref name="uz"/>) from the reference, to basin <paramref name="label"/>'s sums (the direct sampler's path; the lane kernel fills its own).</summary>
    internal void AddBasinDraw(int label, int labels, long index, double ux, double uy, double uz)
    {
        if (BasinSums.Length == 0)
        {
            BasinSums = new double[labels * EnergyBinSums.Groups * BasinSumValues];
        }
        int at = (label * EnergyBinSums.Groups + EnergyBinSums.GroupOf(index, Layout.Samples)) * BasinSumValues;
        var sums = BasinSums;
        sums[at]++;
        (sums[at + 1], sums[at + 2], sums[at + 3]) = (sums[at + 1] + ux, sums[at + 2] + uy, sums[at + 3] + uz);
        (sums[at + 4], sums[at + 5], sums[at + 6]) = (sums[at + 4] + ux * ux, sums[at + 5] + uy * uy, sums[at + 6] + uz * uz);
        (sums[at + 7], sums[at + 8], sums[at + 9]) = (sums[at + 7] + ux * uy, sums[at + 8] + ux * uz, sums[at + 9] + uy * uz);
    }

    /// <summary>The four words of the chain's xoshiro256** state after its last draw: where its seed stream stands.</summary>
    public ImmutableArray<ulong> StreamState => ImmutableArray.Create(_stream);

    /// <summary>Streaming moments of the separation, Å (pairs only).</summary>
    /// <exception cref="InvalidOperationException">For a site record.</exception>
    public MomentAccumulator Separation
        => Coordinates == 1 ? _separation.Complete() : throw new InvalidOperationException("A site record has no separation; read MeanPosition and Covariance.");

    /// <summary>The mean position, Å (sites only).</summary>
    /// <exception cref="InvalidOperationException">For a pair record.</exception>
    public Position MeanPosition
        => Coordinates == 3 ? new Position(_position.MeanX, _position.MeanY, _position.MeanZ) : throw new InvalidOperationException("A pair record has no position; read Separation.");

    /// <summary>The sample covariance of the position (divisor n − 1), Å² (sites only).</summary>
    /// <exception cref="InvalidOperationException">For a pair record.</exception>
    public Analysis.SymmetricTensor Covariance
        => Coordinates == 3 ? _position.Covariance() : throw new InvalidOperationException("A pair record has no covariance; read Separation.");

    /// <summary>The mean of V − V_ref over every recorded draw, eV, with V_ref = <see cref="EnergyReferenceInElectronVolts"/>.</summary>
    public double PotentialEnergyMeanInElectronVolts => Energies.Totals().Mean - Layout.EnergyReference;

    /// <summary>The variance of V over every recorded draw (divisor n), eV².</summary>
    public double PotentialEnergyVarianceInElectronVoltsSquared => Energies.Totals().Variance;

    /// <summary>V_ref: the energy at the site's minimum, or the pair's reference energy, eV.</summary>
    public double EnergyReferenceInElectronVolts => Layout.EnergyReference;

    /// <summary>The histogram of the potential energy above V_ref.</summary>
    public EnergyHistogram EnergyHistogram { get; }

    /// <summary>The fine energy histogram with per-bin position sums that reweighting across temperatures uses.</summary>
    internal EnergyBinSums Reweighting { get; }

    /// <summary>A path-integral chain's centroid-virial kinetic-energy values: their sum, sum of squares (eV, eV²) and count; zeros otherwise.</summary>
    internal (double Sum, double Squares, long Count) Kinetic { get; set; }

    /// <summary>
    /// The counts of the record's histogram: of the separation over the window (pairs), or of the distance from the
    /// harmonic minimum from 0 to the farthest point of the confinement (sites), in equal bins.
    /// </summary>
    public ImmutableArray<long> HistogramCounts => ImmutableArray.Create(Bins.Counts);

    /// <summary>Batch means per coordinate (x, y, z for sites), then of the potential energy.</summary>
    internal BatchMeansStore[] Stores => _stores;

    /// <summary>The potential energy's batch means.</summary>
    internal BatchMeansStore Energies => _stores[Layout.Coordinates];

    internal BinCounter Bins { get; }

    /// <summary>Raw power sums to fourth order of the displacement from the batch references (the minimum), in groups, for the cumulants.</summary>
    internal CumulantSums Cumulants { get; }

    /// <summary>A site chain's distribution counts (principal-axis marginals, radial distance, projection); null for a pair.</summary>
    internal ShapeCounter? Shape { get; }

    internal DrawRecorder<double> KeptSeparations => _keptSeparations ?? throw new InvalidOperationException("A site record keeps positions.");

    internal DrawRecorder<Position> KeptPositions => _keptPositions ?? throw new InvalidOperationException("A pair record keeps separations.");

    internal CovarianceAccumulator PositionMoments => _position;

    /// <summary>Sets the stream position reached (the four generator words).</summary>
    internal void SetStreamState(ReadOnlySpan<ulong> words) => words.CopyTo(_stream);

    /// <summary>One direct draw of a pair: separation <paramref name="r"/> at energy <paramref name="energy"/>.</summary>
    internal void AddSeparation(double r, double energy)
    {
        double b = r - Layout.References[0];
        Reweighting.Add(_separation.Count, energy, [b, b * b]);
        Cumulants.Add(_separation.Count, [r - Layout.References[0]]);
        _separation.Add(r);
        Bins.Add(r);
        _stores[0].Add(r);
        AddEnergy(energy);
        _keptSeparations!.Add(r);
    }

    /// <summary>One direct draw of a site: position (x, y, z) at energy <paramref name="energy"/> (the radial histogram's origin is the layout's reference, the minimum).</summary>
    internal void AddPosition(double x, double y, double z, double energy)
    {
        double ux = x - Layout.References[0], uy = y - Layout.References[1], uz = z - Layout.References[2];
        Reweighting.Add(_position.Count, energy, [ux, uy, uz, ux * ux, uy * uy, uz * uz, ux * uy, ux * uz, uy * uz]);
        Cumulants.Add(_position.Count, [x - Layout.References[0], y - Layout.References[1], z - Layout.References[2]]);
        _position.Add(x, y, z);
        _stores[0].Add(x);
        _stores[1].Add(y);
        _stores[2].Add(z);
        double dx = x - Layout.References[0], dy = y - Layout.References[1], dz = z - Layout.References[2];
        Bins.Add(Math.Sqrt(dx * dx + dy * dy + dz * dz));
        Shape!.Add(x, y, z);
        AddEnergy(energy);
        _keptPositions!.Add(new Position(x, y, z));
    }

    private void AddEnergy(double energy)
    {
        _stores[Layout.Coordinates].Add(energy);
        EnergyHistogram.Add(energy);
    }

    /// <summary>Merges a block of raw power sums of the separation about <paramref name="reference"/> (the lane kernels' path).</summary>
    internal void AddSeparationBlock(int count, double reference, double s1, double s2, double s3, double s4) => _separation.AddBlock(count, reference, s1, s2, s3, s4);

    /// <summary>Merges a block of position moments (the lane kernels' path).</summary>
    internal void AddPositionBlock(in CovarianceAccumulator block) => _position = CovarianceAccumulator.Merge(_position, block);

    /// <summary>Writes everything the record holds (a checkpoint's or a record file's body for this chain).</summary>
    internal void Save(StateWriter w)
    {
        w.Longs("CREC", [Chain, Proposals, Accepted, DrawsNearWall, DrawsOutsideBasin]);
        w.Doubles("CRSC", [ProposalScale, EnergyHistogram.BinWidthInElectronVolts]);
        w.Words("CRST", _stream);
        if (Coordinates == 1)
        {
            _separation.Save(w);
        }
        else
        {
            _position.Save(w);
        }
        foreach (var store in _stores)
        {
            store.Save(w);
        }
        Bins.Save(w);
        Shape?.Save(w);
        Cumulants.Save(w);
        EnergyHistogram.Save(w);
        Reweighting.Save(w);
        w.Doubles("CRKE", [Kinetic.Sum, Kinetic.Squares, Kinetic.Count]);
        w.Longs("CRBN", [DrawsPerBasin.Length]);
        w.Longs("CRBC", DrawsPerBasin);
        w.Doubles("CRBS", BasinSums);
        if (Coordinates == 1)
        {
            _keptSeparations!.Save(w, 1);
        }
        else
        {
            _keptPositions!.Save(w, 3);
        }
    }

    /// <summary>Reads a record that <see cref="Save"/> wrote with the same layout.</summary>
    internal static ChainRecord Read(StateReader r, RecordLayout layout)
    {
        var (head, scales) = ReadHead(r);
        var record = new ChainRecord(layout, (int)r.InRange(head[0], 0, int.MaxValue, "the chain index"), scales[1]);
        record.LoadBody(r, head, scales);
        return record;
    }

    /// <summary>Restores what <see cref="Save"/> wrote into this record (a checkpoint resumed into the record it was taken from).</summary>
    internal void Load(StateReader r)
    {
        var (head, scales) = ReadHead(r);
        r.InRange(head[0], Chain, Chain, "the chain index");
        if (scales[1] != EnergyHistogram.BinWidthInElectronVolts)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                $"The record's energy bin width is {scales[1]:R} eV where this run's is {EnergyHistogram.BinWidthInElectronVolts:R} eV."));
        }
        LoadBody(r, head, scales);
    }

    private static (long[] Head, double[] Scales) ReadHead(StateReader r)
    {
        var head = r.Longs("CREC", 5);
        var scales = r.Doubles("CRSC", 2);
        if (!(scales[1] > 0) || double.IsInfinity(scales[1]) || Math.ScaleB(1.0, Math.ILogB(scales[1])) != scales[1])
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The record's energy bin width {scales[1]:R} eV is not a positive power of two."));
        }
        return (head, scales);
    }

    private void LoadBody(StateReader r, long[] head, double[] scales)
    {
        Proposals = r.InRange(head[1], 0, long.MaxValue, "the proposals");
        Accepted = r.InRange(head[2], 0, Proposals, "the accepted proposals");
        ProposalScale = scales[0];
        r.Words("CRST", 4).CopyTo(_stream, 0);
        if (Coordinates == 1)
        {
            _separation.Load(r);
        }
        else
        {
            _position = CovarianceAccumulator.Load(r);
        }
        foreach (var store in _stores)
        {
            store.Load(r);
        }
        Bins.Load(r);
        Shape?.Load(r);
        Cumulants.Load(r);
        EnergyHistogram.Load(r);
        Reweighting.Load(r);
        var kinetic = r.Doubles("CRKE", 3);
        Kinetic = (kinetic[0], kinetic[1], (long)r.InRange((long)kinetic[2], 0, long.MaxValue, "the kinetic-energy values"));
        int basins = (int)r.InRange(r.Longs("CRBN", 1)[0], 0, 256, "the basins");
        DrawsPerBasin = r.Longs("CRBC", basins);
        BasinSums = r.Doubles("CRBS", -1, basins * EnergyBinSums.Groups * BasinSumValues);
        if (BasinSums.Length is not 0 && BasinSums.Length != basins * EnergyBinSums.Groups * BasinSumValues)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                $"The record's per-basin sums hold {BasinSums.Length} values; expected 0 or {basins * EnergyBinSums.Groups * BasinSumValues} ({basins} basins)."));
        }
        if (Coordinates == 1)
        {
            _keptSeparations!.Load(r, 1);
        }
        else
        {
            _keptPositions!.Load(r, 3);
        }
        long draws = Draws;
        DrawsNearWall = r.InRange(head[3], 0, draws, "the draws near the wall");
        DrawsOutsideBasin = r.InRange(head[4], 0, draws, "the draws outside the basin");
    }
}

/// <summary>The covariance tensor of a position accumulator.</summary>
internal static class CovarianceTensor
{
    /// <summary>The sample covariance (divisor n − 1; n = 1 gives the zero tensor's co-moments over 1), Å².</summary>
    internal static Analysis.SymmetricTensor Covariance(this in CovarianceAccumulator a)
    {
        double d = a.Count > 1 ? a.Count - 1 : 1;
        return new Analysis.SymmetricTensor(a.Cxx / d, a.Cyy / d, a.Czz / d, a.Cxy / d, a.Cxz / d, a.Cyz / d);
    }
}

/// <summary>
/// What every chain record of one temperature shares, and what it takes to rebuild one from bytes: the coordinates, the
/// draws per chain, the diagnostic and retained-draw caps, the batch means' references, the histogram's range and bins.
/// </summary>
/// <param name="Coordinates">1 (a pair's separation) or 3 (a site's position).</param>
/// <param name="Samples">Recorded draws per chain.</param>
/// <param name="MaxDiagnosticValues">The batch-means cap per chain.</param>
/// <param name="Retained">Raw draws kept per chain.</param>
/// <param name="References">The batch means' reference per coordinate, Å.</param>
/// <param name="EnergyReference">V_ref, eV.</param>
/// <param name="BinLower">The histogram's lower edge, Å.</param>
/// <param name="BinUpper">The histogram's upper edge, Å.</param>
/// <param name="Bins">The histogram's bin count.</param>
/// <param name="Waves">The scattering vectors whose exp(iq·u) sums are kept, Å⁻¹ (<paramref name="Coordinates"/> values per vector).</param>
/// <param name="Shape">Where a site's distribution histograms are taken (null for a pair).</param>
internal sealed record RecordLayout(int Coordinates, long Samples, int MaxDiagnosticValues, int Retained, double[] References, double EnergyReference,
    double BinLower, double BinUpper, int Bins, double[] Waves, ShapeFrame? Shape)
{
    /// <summary>The number of scattering vectors.</summary>
    internal int WaveCount => Waves.Length / Coordinates;

    /// <summary>Whether <paramref name="other"/> describes the same records, value for value.</summary>
    internal bool SameAs(RecordLayout other)
        => Coordinates == other.Coordinates && Samples == other.Samples && MaxDiagnosticValues == other.MaxDiagnosticValues && Retained == other.Retained
            && References.AsSpan().SequenceEqual(other.References) && EnergyReference.Equals(other.EnergyReference) && BinLower.Equals(other.BinLower)
            && BinUpper.Equals(other.BinUpper) && Bins == other.Bins && Waves.AsSpan().SequenceEqual(other.Waves)
            && (Shape is null ? other.Shape is null : other.Shape is not null && Shape.SameAs(other.Shape));

    internal void Save(StateWriter w)
    {
        w.Longs("RLAY", [Coordinates, Samples, MaxDiagnosticValues, Retained, Bins]);
        var values = new double[References.Length + 3];
        References.CopyTo(values, 0);
        (values[^3], values[^2], values[^1]) = (EnergyReference, BinLower, BinUpper);
        w.Doubles("RLAV", values);
        w.Longs("RLWN", [Waves.Length]);
        w.Doubles("RLAW", Waves);
        w.Doubles("RLSF", Shape?.ToValues() ?? []);
    }

    internal static RecordLayout Load(StateReader r)
    {
        var head = r.Longs("RLAY", 5);
        int coordinates = (int)head[0];
        if (coordinates is not (1 or 3))
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The record has {coordinates} coordinates; valid: 1 or 3."));
        }
        long samples = r.InRange(head[1], 1, 1L << 40, "the draws per chain");
        int cap = (int)r.InRange(head[2], 64, 10_000_000, "the diagnostic values per chain");
        int retained = (int)r.InRange(head[3], 0, 10_000_000, "the retained draws per chain");
        int bins = (int)r.InRange(head[4], 1, 1_000_000, "the histogram bins");
        var v = r.Doubles("RLAV", coordinates + 3);
        if (!(v[^1] > v[^2]))
        {
            throw new CheckpointException("The record's histogram range is empty.");
        }
        int waves = (int)r.InRange(r.Longs("RLWN", 1)[0], 0, SettingsFields.MaxScatteringValues, "the scattering-vector values");
        if (waves % coordinates != 0)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The record has {waves} scattering-vector values, not a multiple of its {coordinates} coordinates."));
        }
        var q = r.Doubles("RLAW", waves);
        var shape = r.Doubles("RLSF", coordinates == 3 ? ShapeFrame.ValueCount : 0);
        return new RecordLayout(coordinates, samples, cap, retained, v[..coordinates], v[^3], v[^2], v[^1], bins, q,
            coordinates == 3 ? ShapeFrame.FromValues(shape) : null);
    }
}
