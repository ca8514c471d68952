using System;
using System.Globalization;
using System.Collections.Generic;
using System.IO;
using System.Linq;
using System.Text.Json;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Reports;
using ThermalSampling.Units;

namespace ThermalSampling.Cli;

/// <summary>
/// Writes the stable JSON document of a run. Keys are camelCase; values are in the scenario's length unit (squared for
/// variances, covariances, MSD and B); a quantity that does not apply, or is not finite, is left out.
/// </summary>
internal static class ReportJsonWriter
{
    internal static void Write(ScenarioResults results, Stream output)
    {
        var s = results.Scenario;
        double l = s.AngstromsPerLengthUnit;
        using var w = new Utf8JsonWriter(output, new JsonWriterOptions { Indented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
        w.WriteStartObject();
        w.WriteString("title", s.Title);
        w.WriteStartObject("units");
        w.WriteString("energy", s.EnergyUnit);
        w.WriteString("length", s.LengthUnit);
        w.WriteString("mass", "u");
        w.WriteString("temperature", "K");
        w.WriteEndObject();
        w.WriteString("libraryVersion", Provenance.CurrentLibraryVersion);
        WriteInputs(w, s, results.Surface);
        w.WriteStartArray("results");
        for (int i = 0; i < results.Pairs.Count; i++)
        {
            WritePair(w, results.Pairs[i], l, s, results.PairQuantum?[i]);
        }
        double e = ScenarioUnits.Energy[s.EnergyUnit];
        for (int i = 0; i < results.Sites.Count; i++)
        {
            WriteSite(w, results.Sites[i], l, e, s, results.SiteQuantum?[i]);
        }
        foreach (var r in results.PairReweighted ?? [])
        {
            WriteReweightedPair(w, r, l, e);
        }
        foreach (var r in results.SiteReweighted ?? [])
        {
            WriteReweightedSite(w, r, l, e);
        }
        w.WriteEndArray();
        WriteLadder(w, results);
        if (SweepWarnings.BasinPopulationShift(results.Sites) is { } shift)
        {
            w.WriteStartArray("sweepWarnings");
            w.WriteStartObject();
            w.WriteString("code", shift.Code);
            w.WriteString("message", UnitText.InUnits(shift.Message, s.EnergyUnit, s.LengthUnit));
            w.WriteEndObject();
            w.WriteEndArray();
        }
        WriteEinsteinFit(w, results, l);
        w.WriteEndObject();
    }

    /// <summary>
    /// With three or more temperatures: the Einstein form fitted to the sampled U(T) (a pair's variance, a site's U_iso =
    /// MSD/3, with their standard errors; sites that leave their basin are left out), or nothing when the curve does not
    /// have that form.
    /// </summary>
    private static void WriteEinsteinFit(Utf8JsonWriter w, ScenarioResults results, double l)
    {
        var points = results.Pairs.Where(r => r.Harmonic is not null && r.Variance.StandardError > 0)
            .Select(r => new DisplacementPoint(r.Temperature, r.Variance.Value, r.Variance.StandardError))
            .Concat(results.Sites.Where(r => r.StaysAtSite && r.MeanSquareDisplacement.StandardError > 0)
                .Select(r => new DisplacementPoint(r.Temperature, r.MeanSquareDisplacement.Value / 3, r.MeanSquareDisplacement.StandardError / 3)))
            .ToList();
        if (points.Count < 3)
        {
            return;
        }
        EinsteinFitResult fit;
        try
        {
            // The samples are classical: the classical limit of the Einstein form (no zero-point part).
            fit = EinsteinFit.Fit(points, Mass.FromAtomicMassUnits(results.Scenario.MassInAtomicMassUnits), form: EinsteinForm.Classical);
        }
        catch (ArgumentException)
        {
            return; // not of the Einstein form: no fit is given rather than a meaningless one
        }
        w.WriteStartObject("einsteinFit");
        w.WriteNumber("einsteinTemperature", fit.EinsteinTemperatureInKelvin);
        Number(w, "einsteinTemperatureStdErr", fit.EinsteinTemperatureStandardError);
        w.WriteNumber("chiSquared", fit.ChiSquared);
        w.WriteNumber("degreesOfFreedom", fit.DegreesOfFreedom);
        Numbers(w, "temperatures", points.Select(p => p.Temperature.InKelvin), 1);
        w.WriteString("form", "classical");
        Numbers(w, "model", points.Select(p => EinsteinFit.Model(fit.EinsteinTemperatureInKelvin, p.Temperature.InKelvin, results.Scenario.MassInAtomicMassUnits,
            EinsteinForm.Classical)), l * l);
        w.WriteEndObject();
    }

    /// <summary>
    /// The inputs: the scenario document as given (<c>input</c>, in its own units) and what the run resolved from it
    /// (<c>resolved</c>: the temperatures actually run, after a sweep's range, and every sampling setting with its default
    /// filled in), so that the document alone is enough to reproduce every number in it with the same library version.
    /// </summary>
    /// <summary>A replica-exchange run: its ladder (the rungs run, which were added, the predicted swap acceptances of an automatic one).</summary>
    private static void WriteLadder(Utf8JsonWriter w, ScenarioResults results)
    {
        var s = results.Scenario;
        if (s.Ladder is null)
        {
            return;
        }
        w.WriteStartObject("ladder");
        w.WriteString("mode", s.Ladder);
        w.WriteNumber("swapInterval", s.Sampling.SwapInterval ?? 0);
        var rungs = results.Ladder?.Temperatures.Select(t => t.InKelvin).ToArray() ?? [.. s.TemperaturesInKelvin];
        w.WriteStartArray("temperatures");
        foreach (double t in rungs)
        {
            w.WriteNumberValue(t);
        }
        w.WriteEndArray();
        w.WriteStartArray("added");
        foreach (double t in rungs.Where(t => !s.TemperaturesInKelvin.Contains(t)))
        {
            w.WriteNumberValue(t);
        }
        w.WriteEndArray();
        if (results.Ladder is { } plan)
        {
            w.WriteNumber("targetSwapAcceptance", plan.TargetSwapAcceptance);
            w.WriteString("predictionBasis", plan.Basis);
            w.WriteStartArray("predictedSwapAcceptance");
            foreach (double a in plan.PredictedSwapAcceptance)
            {
                w.WriteNumberValue(a);
            }
            w.WriteEndArray();
        }
        w.WriteEndObject();
    }

    private static void WriteInputs(Utf8JsonWriter w, Scenario s, (string Site, string Frame)? surface)
    {
        w.WritePropertyName("input");
        using (var input = JsonDocument.Parse(s.SourceJson))
        {
            input.RootElement.WriteTo(w);
        }
        var o = s.Sampling;
        w.WriteStartObject("resolved");
        w.WriteNumber("mass", s.MassInAtomicMassUnits);
        w.WriteStartArray("temperatures");
        foreach (double t in s.TemperaturesInKelvin)
        {
            w.WriteNumberValue(t);
        }
        w.WriteEndArray();
        w.WriteStartObject("sampling");
        w.WriteString("method", o.SwapInterval is not null ? "replica-exchange" : o.Method == Sampling.SamplingMethod.Metropolis ? "metropolis" : "direct");
        if (o.SwapInterval is int interval)
        {
            w.WriteNumber("swapInterval", interval);
            w.WriteString("ladder", s.Ladder);
            w.WriteNumber("targetSwapAcceptance", s.TargetSwapAcceptance);
        }
        w.WriteNumber("seed", o.Seed);
        w.WriteNumber("chains", o.Chains);
        w.WriteNumber("samplesPerChain", o.SamplesPerChain);
        w.WriteNumber("burnIn", o.BurnIn);
        Number(w, "targetAcceptance", o.TargetAcceptance);
        Number(w, "initialStepWidth", o.InitialStepWidthInAngstroms / s.AngstromsPerLengthUnit);
        w.WriteNumber("histogramBins", o.HistogramBins);
        if (s.Landscape.Kind is not ("line" or "radial"))
        {
            w.WriteNumber("siteRangeInSigmas", o.SiteDistributionHalfWidthInSigmas);
        }
        w.WriteNumber("maxDiagnosticValuesPerChain", o.MaxDiagnosticValuesPerChain);
        w.WriteNumber("retainedDrawsPerChain", o.RetainedDrawsPerChain);
        w.WriteEndObject();
        if (surface is { } sf)
        {
            w.WriteStartObject("surface");
            w.WriteString("site", sf.Site);
            w.WriteString("frame", sf.Frame);
            w.WriteEndObject();
        }
        var pairs = ScenarioRunner.PairSummary(s.Landscape).ToList();
        if (pairs.Count > 0)
        {
            // A structure with species pairs or charges: how each neighbour species acts on the moving atom, so nothing is silently missing.
            w.WriteStartArray("pairs");
            foreach (string pair in pairs)
            {
                w.WriteStringValue(pair);
            }
            w.WriteEndArray();
        }
        w.WriteEndObject();
    }

    /// <summary>A harmonic frequency in the units the trade reads it in, whatever the scenario's units: meV, THz and cm⁻¹.</summary>
    private static void Frequency(Utf8JsonWriter w, Units.VibrationFrequency f)
    {
        Number(w, "energyMeV", f.InMilliElectronVolts);
        Number(w, "frequencyTHz", f.InTerahertz);
        Number(w, "wavenumberPerCm", f.InReciprocalCentimetres);
    }

    private static void Number(Utf8JsonWriter w, string name, double? value)
    {
        if (value is double v && double.IsFinite(v))
        {
            w.WriteNumber(name, v);
        }
    }

    /// <summary>An array of numbers, each divided by <paramref name="unit"/>; a value that cannot be estimated (NaN) is null.</summary>
    private static void Numbers(Utf8JsonWriter w, string? name, IEnumerable<double> values, double unit)
    {
        if (name is null)
        {
            w.WriteStartArray(); // an array inside an array
        }
        else
        {
            w.WriteStartArray(name);
        }
        foreach (double v in values)
        {
            if (double.IsFinite(v))
            {
                w.WriteNumberValue(v / unit);
            }
            else
            {
                w.WriteNullValue();
            }
        }
        w.WriteEndArray();
    }

    /// <summary>A symmetry form: per component, the index of the component it equals, or −1 when symmetry forces it to zero.</summary>
    private static void Forms(Utf8JsonWriter w, string name, IEnumerable<int> form)
    {
        w.WriteStartArray(name);
        foreach (int f in form)
        {
            w.WriteNumberValue(f);
        }
        w.WriteEndArray();
    }

    /// <summary>The <c>cumulants</c> object: third and fourth cumulants with standard errors (scalars for a pair, tensor components for a site).</summary>
    private static void Cumulants(Utf8JsonWriter w, IReadOnlyList<Estimate> third, IReadOnlyList<Estimate> fourth, double l, bool scalar)
    {
        w.WriteStartObject("cumulants");
        double l3 = l * l * l, l4 = l3 * l;
        if (scalar)
        {
            Number(w, "third", third[0].Value / l3);
            Number(w, "thirdStdErr", third[0].StandardError / l3);
            Number(w, "fourth", fourth[0].Value / l4);
            Number(w, "fourthStdErr", fourth[0].StandardError / l4);
        }
        else
        {
            Numbers(w, "third", third.Select(x => x.Value), l3);
            Numbers(w, "thirdStdErr", third.Select(x => x.StandardError), l3);
            Numbers(w, "fourth", fourth.Select(x => x.Value), l4);
            Numbers(w, "fourthStdErr", fourth.Select(x => x.StandardError), l4);
        }
        w.WriteEndObject();
    }

    /// <summary>
    /// The <c>temperatureFactor</c> array, one object per scattering vector (absent when none was asked for): q in inverse
    /// scenario length units (a number for a pair, [q_x, q_y, q_z] for a site), the sampled real and imaginary parts with
    /// standard errors, the exact parts (pairs), the harmonic factor and the ratio to it, the Gaussian of the sampled
    /// covariance and the departure from it with its standard error, and whether that departure exceeds 3 standard errors.
    /// </summary>
    private static void TemperatureFactors(Utf8JsonWriter w, IReadOnlyList<TemperatureFactorPoint> points, double l)
    {
        if (points.Count == 0)
        {
            return;
        }
        w.WriteStartArray("temperatureFactor");
        foreach (var p in points)
        {
            w.WriteStartObject();
            // q back in the scenario's units, rounded to 15 digits so that the value typed comes back as typed.
            static double Typed(double q, double l) => double.Parse((q * l).ToString("G15", CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);
            if (p.ScatteringVector.Length == 1)
            {
                w.WriteNumber("q", Typed(p.ScatteringVector[0], l));
            }
            else
            {
                Numbers(w, "q", p.ScatteringVector.Select(q => Typed(q, l)), 1);
            }
            Number(w, "value", p.Real.Value);
            Number(w, "imaginary", p.Imaginary.Value);
            Number(w, "stdErr", p.Real.StandardError);
            Number(w, "imaginaryStdErr", p.Imaginary.StandardError);
            Number(w, "exact", p.ExactReal);
            Number(w, "exactImaginary", p.ExactImaginary);
            Number(w, "harmonic", p.Harmonic);
            Number(w, "ratio", p.RatioToHarmonic?.Value);
            Number(w, "ratioStdErr", p.RatioToHarmonic?.StandardError);
            Number(w, "gaussian", p.Gaussian);
            Number(w, "departureFromGaussian", p.DepartureFromGaussian.Value);
            Number(w, "departureFromGaussianStdErr", p.DepartureFromGaussian.StandardError);
            w.WriteBoolean("gaussianFails", p.GaussianFails);
            w.WriteEndObject();
        }
        w.WriteEndArray();
    }

    /// <summary>A histogram's <c>edges</c>, <c>density</c> and <c>densityStdErr</c> in the scenario's length unit.</summary>
    private static void Bins(Utf8JsonWriter w, Histogram h, double l)
    {
        Numbers(w, "edges", Enumerable.Range(0, h.Density.Length + 1).Select(i => i == h.Density.Length ? h.Upper : h.Lower + i * h.BinWidth), l);
        Numbers(w, "density", h.Density, 1 / l);
        Numbers(w, "densityStdErr", h.DensityStandardError, 1 / l);
    }

    /// <summary>
    /// A site's <c>distribution</c>: the centre, the principal axes (rows), the marginal along each (edges from the centre),
    /// the radial density of the distance from the centre, and the projected density on the plane of the first two axes
    /// (<c>density</c>[i][j], i along the first axis), each with standard errors and the share of draws beyond its range.
    /// </summary>
    private static void SiteDistribution(Utf8JsonWriter w, SiteDistribution d, double l)
    {
        w.WriteStartObject("distribution");
        Vector(w, "centre", d.Centre, l);
        w.WriteStartArray("principalAxes");
        foreach (var a in d.PrincipalAxes)
        {
            w.WriteStartArray();
            w.WriteNumberValue(a.X);
            w.WriteNumberValue(a.Y);
            w.WriteNumberValue(a.Z);
            w.WriteEndArray();
        }
        w.WriteEndArray();
        w.WriteStartArray("marginals");
        for (int k = 0; k < 3; k++)
        {
            w.WriteStartObject();
            Bins(w, d.Marginals[k], l);
            w.WriteNumber("shareOutside", d.ShareOutsideMarginals[k]);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteStartObject("radial");
        Bins(w, d.Radial, l);
        w.WriteNumber("shareOutside", d.ShareBeyondRadial);
        w.WriteEndObject();
        var p = d.Projection;
        w.WriteStartObject("projection");
        Numbers(w, "firstEdges", Enumerable.Range(0, p.Side + 1).Select(i => p.FirstLower + i * (p.FirstUpper - p.FirstLower) / p.Side), l);
        Numbers(w, "secondEdges", Enumerable.Range(0, p.Side + 1).Select(i => p.SecondLower + i * (p.SecondUpper - p.SecondLower) / p.Side), l);
        foreach (var (name, values) in new[] { ("density", p.Density), ("densityStdErr", p.DensityStandardError) })
        {
            w.WriteStartArray(name);
            for (int i = 0; i < p.Side; i++)
            {
                Numbers(w, null, values.Skip(i * p.Side).Take(p.Side), 1 / (l * l));
            }
            w.WriteEndArray();
        }
        w.WriteNumber("shareOutside", d.ShareOutsideProjection);
        w.WriteEndObject();
        w.WriteEndObject();
    }

    /// <summary>A symmetric tensor as a 3×3 array of rows, each value divided by <paramref name="unit"/>.</summary>
    private static void Matrix(Utf8JsonWriter w, string name, SymmetricTensor t, double unit)
    {
        w.WriteStartArray(name);
        for (int i = 0; i < 3; i++)
        {
            w.WriteStartArray();
            for (int j = 0; j < 3; j++)
            {
                w.WriteNumberValue(t[i, j] / unit);
            }
            w.WriteEndArray();
        }
        w.WriteEndArray();
    }

    private static void Vector(Utf8JsonWriter w, string name, Position p, double l)
    {
        w.WriteStartArray(name);
        w.WriteNumberValue(p.X / l);
        w.WriteNumberValue(p.Y / l);
        w.WriteNumberValue(p.Z / l);
        w.WriteEndArray();
    }

    private static void Common(Utf8JsonWriter w, SamplingDiagnostics d, System.Collections.Immutable.ImmutableArray<Warning> warnings, Scenario s)
    {
        w.WriteStartObject("diagnostics");
        Number(w, "acceptanceRate", d.AcceptanceRate);
        Number(w, "autocorrelationTime", d.AutocorrelationTime);
        Number(w, "effectiveSampleSize", d.EffectiveSampleSize);
        Number(w, "rHat", d.RHat);
        w.WriteNumber("draws", d.Draws);
        if (d.ReplicaExchange is { } x)
        {
            if (x.SwapAcceptance is double a)
            {
                w.WriteNumber("swapAcceptance", a); // with the next-higher rung; absent for the top one
            }
            w.WriteStartObject("replicaExchange");
            w.WriteNumber("rung", x.Rung);
            w.WriteNumber("swapAttempts", x.SwapAttempts);
            w.WriteNumber("swapInterval", x.SwapInterval);
            w.WriteNumber("roundTrips", x.RoundTrips);
            Number(w, "meanRoundTripSteps", x.MeanRoundTripSteps);
            w.WriteEndObject();
        }
        w.WriteEndObject();
        w.WriteStartArray("warnings");
        foreach (var warning in warnings)
        {
            w.WriteStartObject();
            w.WriteString("code", warning.Code);
            w.WriteString("message", UnitText.InUnits(warning.Message, s.EnergyUnit, s.LengthUnit)); // in the scenario's units
            w.WriteEndObject();
        }
        w.WriteEndArray();
    }

    private static void WritePair(Utf8JsonWriter w, PairVibrationReport r, double l, Scenario s, PairPathIntegralReport? quantum)
    {
        double l2 = l * l;
        w.WriteStartObject();
        w.WriteNumber("temperature", r.Temperature.InKelvin);
        if (s.ReweightTo is not null)
        {
            w.WriteString("source", "sampled");
        }
        Number(w, "minimum", r.MinimumInAngstroms / l);
        Number(w, "mean", r.Mean.Value / l);
        Number(w, "meanShift", r.MeanShift?.Value / l);
        Number(w, "meanShiftStdErr", r.MeanShift?.StandardError / l);
        Number(w, "variance", r.Variance.Value / l2);
        Number(w, "varianceStdErr", r.Variance.StandardError / l2);
        Number(w, "rms", r.Rms.Value / l);
        Number(w, "rmsStdErr", r.Rms.StandardError / l);
        Number(w, "skewness", r.Skewness);
        Number(w, "excessKurtosis", r.ExcessKurtosis);
        Cumulants(w, [r.ThirdCumulant], [r.FourthCumulant], l, scalar: true);
        var hist = r.Histogram;
        w.WriteStartObject("distribution");
        Bins(w, hist, l);
        Numbers(w, "exact", r.ExactBinDensity, 1 / l);
        if (!r.HarmonicBinDensity.IsEmpty)
        {
            Numbers(w, "harmonic", r.HarmonicBinDensity, 1 / l);
        }
        w.WriteEndObject();
        double e = ScenarioUnits.Energy[s.EnergyUnit];
        Number(w, "potentialEnergy", r.PotentialEnergy.Value / e);
        Number(w, "potentialEnergyStdErr", r.PotentialEnergy.StandardError / e);
        if (r.Harmonic is { } h)
        {
            w.WriteStartObject("harmonic");
            Number(w, "variance", h.ClassicalVarianceInAngstromsSquared / l2);
            Number(w, "quantumVariance", h.QuantumVarianceInAngstromsSquared / l2);
            Frequency(w, h.Frequency);
            w.WriteEndObject();
        }
        if (r.FirstOrder is { } f)
        {
            w.WriteStartObject("firstOrder");
            Number(w, "meanShift", f.MeanShiftInAngstroms / l);
            Number(w, "variance", f.VarianceInAngstromsSquared / l2);
            w.WriteEndObject();
        }
        w.WriteStartObject("exact");
        Number(w, "mean", r.Exact.Mean / l);
        Number(w, "variance", r.Exact.Variance / l2);
        Number(w, "skewness", r.Exact.Skewness);
        Number(w, "excessKurtosis", r.Exact.ExcessKurtosis);
        Number(w, "probabilityNearWalls", r.Exact.ProbabilityNearWalls);
        Number(w, "zScoreMean", r.Exact.ZScoreMean);
        Number(w, "zScoreVariance", r.Exact.ZScoreVariance);
        w.WriteStartObject("cumulants");
        Number(w, "third", r.Exact.ThirdCumulant / (l2 * l));
        Number(w, "fourth", r.Exact.FourthCumulant / (l2 * l2));
        w.WriteEndObject();
        w.WriteEndObject();
        if (r.QuantumExact is { } q)
        {
            // Where classical statistics fail: the exact quantum distribution on the same walls (docs/quantum.md).
            w.WriteStartObject("quantumExact");
            Number(w, "mean", q.MeanInAngstroms / l);
            Number(w, "variance", q.VarianceInAngstromsSquared / l2);
            Number(w, "rms", q.RmsInAngstroms / l);
            Number(w, "skewness", q.Skewness);
            Number(w, "excessKurtosis", q.ExcessKurtosis);
            Number(w, "varianceRatioToClassical", q.VarianceInAngstromsSquared / r.Exact.Variance);
            w.WriteNumber("boundLevels", q.BoundLevels);
            Number(w, "shareAboveEscape", q.ShareAboveEscape);
            w.WriteNumber("gridPoints", q.GridPoints);
            w.WriteNumber("angularMomenta", q.AngularMomenta);
            w.WriteBoolean("converged", q.Converged);
            w.WriteEndObject();
        }
        TemperatureFactors(w, r.TemperatureFactors, l);
        if (quantum is not null)
        {
            // Quantum statistics: the keys above are the path integral's; here the classical run's, and how the quantum values were made.
            var c = quantum.Classical;
            w.WriteStartObject("classical");
            Number(w, "mean", c.Mean.Value / l);
            Number(w, "meanStdErr", c.Mean.StandardError / l);
            Number(w, "meanShift", c.MeanShift?.Value / l);
            Number(w, "meanShiftStdErr", c.MeanShift?.StandardError / l);
            Number(w, "variance", c.Variance.Value / l2);
            Number(w, "varianceStdErr", c.Variance.StandardError / l2);
            Number(w, "rms", c.Rms.Value / l);
            Number(w, "rmsStdErr", c.Rms.StandardError / l);
            w.WriteEndObject();
            QuantumDetails(w, quantum.PathIntegral, l, quantum.AtBeads.Variance, quantum.AtHalfBeads.Variance, "variance",
                quantum.KineticEnergy, quantum.ClassicalKineticEnergyInElectronVolts, ScenarioUnits.Energy[s.EnergyUnit],
                quantum.Variance.Value / quantum.Classical.Variance.Value, [quantum.PathIntegral.LargestQuantumToThermalRatio]);
        }
        Common(w, r.Diagnostics, r.Warnings, s);
        w.WriteEndObject();
    }

    /// <summary>The <c>quantum</c> object: beads, extrapolation, zero-point variance, convergence, and the two runs' values of <paramref name="what"/>.</summary>
    private static void QuantumDetails(Utf8JsonWriter w, PathIntegralDetails d, double l, Estimate atBeads, Estimate atHalfBeads, string what,
        Estimate kinetic, double classicalKinetic, double energyUnit, double ratioToClassical, double[] perMode)
    {
        double l2 = l * l;
        w.WriteStartObject("quantum");
        w.WriteNumber("beads", d.Beads);
        w.WriteBoolean("extrapolated", d.Extrapolated);
        Number(w, "zeroPointVariance", d.ZeroPointVarianceInAngstromsSquared / l2);
        w.WriteBoolean("converged", d.Converged);
        w.WriteNumber("stagingLinks", d.StagingLinks);
        Number(w, "relativeBeadCorrection", d.RelativeBeadCorrection);
        Number(w, "hbarOmegaOverKT", d.LargestQuantumToThermalRatio);
        Numbers(w, "hbarOmegaOverKTPerMode", perMode, 1);
        Number(w, "ratioToClassical", ratioToClassical);
        Number(w, "thermalWavelength", d.ThermalWavelengthInAngstroms / l);
        Number(w, "kineticEnergy", kinetic.Value / energyUnit);
        Number(w, "kineticEnergyStdErr", kinetic.StandardError / energyUnit);
        Number(w, "classicalKineticEnergy", classicalKinetic / energyUnit);
        w.WriteStartArray("runs");
        foreach (var (beads, value) in new[] { (d.Beads, atBeads), (d.Beads / 2, atHalfBeads) })
        {
            w.WriteStartObject();
            w.WriteNumber("beads", beads);
            Number(w, what, value.Value / l2);
            Number(w, what + "StdErr", value.StandardError / l2);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteEndObject();
    }

    /// <summary>A reweighted pair result: the usual keys with standard errors, the exact quadrature, and where it came from.</summary>
    private static void WriteReweightedPair(Utf8JsonWriter w, ReweightedPairEstimate r, double l, double e)
    {
        double l2 = l * l;
        w.WriteStartObject();
        w.WriteNumber("temperature", r.Temperature.InKelvin);
        w.WriteString("source", "reweighted");
        Number(w, "mean", r.Mean.Value / l);
        Number(w, "meanStdErr", r.Mean.StandardError / l);
        Number(w, "meanShift", r.MeanShift?.Value / l);
        Number(w, "meanShiftStdErr", r.MeanShift?.StandardError / l);
        Number(w, "variance", r.Variance.Value / l2);
        Number(w, "varianceStdErr", r.Variance.StandardError / l2);
        Number(w, "rms", r.Rms.Value / l);
        Number(w, "rmsStdErr", r.Rms.StandardError / l);
        Number(w, "potentialEnergy", r.PotentialEnergy.Value / e);
        Number(w, "potentialEnergyStdErr", r.PotentialEnergy.StandardError / e);
        w.WriteStartObject("exact");
        Number(w, "mean", r.Exact.MeanInAngstroms / l);
        Number(w, "variance", r.Exact.VarianceInAngstromsSquared / l2);
        Number(w, "skewness", r.Exact.Skewness);
        Number(w, "excessKurtosis", r.Exact.ExcessKurtosis);
        Number(w, "zScoreMean", r.Mean.ZScore(r.Exact.MeanInAngstroms));
        Number(w, "zScoreVariance", r.Variance.ZScore(r.Exact.VarianceInAngstromsSquared));
        w.WriteEndObject();
        ReweightingSource(w, r.Source);
        w.WriteEndObject();
    }

    /// <summary>A reweighted site result: mean, covariance, MSD and B with standard errors, and where it came from.</summary>
    private static void WriteReweightedSite(Utf8JsonWriter w, ReweightedSiteEstimate r, double l, double e)
    {
        double l2 = l * l;
        w.WriteStartObject();
        w.WriteNumber("temperature", r.Temperature.InKelvin);
        w.WriteString("source", "reweighted");
        Vector(w, "mean", r.Mean, l);
        Vector(w, "meanStdErr", r.MeanStandardError, l);
        Matrix(w, "covariance", r.Covariance, l2);
        Number(w, "meanSquareDisplacement", r.MeanSquareDisplacement.Value / l2);
        Number(w, "meanSquareDisplacementStdErr", r.MeanSquareDisplacement.StandardError / l2);
        Number(w, "debyeWallerB", r.DebyeWallerB.Value / l2);
        Number(w, "debyeWallerBStdErr", r.DebyeWallerB.StandardError / l2);
        Number(w, "potentialEnergy", r.PotentialEnergy.Value / e);
        Number(w, "potentialEnergyStdErr", r.PotentialEnergy.StandardError / e);
        ReweightingSource(w, r.Source);
        w.WriteEndObject();
    }

    private static void ReweightingSource(Utf8JsonWriter w, ReweightingSource s)
    {
        w.WriteStartObject("reweighting");
        w.WriteStartArray("from");
        w.WriteNumberValue(s.LowerKelvin);
        w.WriteNumberValue(s.UpperKelvin);
        w.WriteEndArray();
        Number(w, "overlap", s.Overlap);
        Number(w, "shareLeftOut", s.ShareLeftOut);
        w.WriteEndObject();
    }

    private static void WriteSite(Utf8JsonWriter w, SiteVibrationReport r, double l, double e, Scenario s, SitePathIntegralReport? quantum)
    {
        double l2 = l * l;
        w.WriteStartObject();
        w.WriteNumber("temperature", r.Temperature.InKelvin);
        if (s.ReweightTo is not null)
        {
            w.WriteString("source", "sampled");
        }
        Vector(w, "minimum", r.Minimum, l);
        Vector(w, "mean", r.Mean, l);
        Vector(w, "meanShift", r.MeanShift, l);
        Vector(w, "meanShiftStdErr", r.MeanStandardError, l);
        Matrix(w, "covariance", r.Covariance, l2);
        Number(w, "meanSquareDisplacement", r.MeanSquareDisplacement.Value / l2);
        Number(w, "meanSquareDisplacementStdErr", r.MeanSquareDisplacement.StandardError / l2);
        Cumulants(w, r.ThirdCumulants, r.FourthCumulants, l, scalar: false);
        SiteDistribution(w, r.Distribution, l);
        w.WriteStartObject("symmetry");
        w.WriteString("pointGroup", r.Symmetry.PointGroup);
        w.WriteNumber("operations", r.Symmetry.Operations.Length);
        Forms(w, "covariance", r.Symmetry.CovarianceForm);
        Forms(w, "third", r.Symmetry.ThirdForm);
        Forms(w, "fourth", r.Symmetry.FourthForm);
        w.WriteEndObject();
        if (s.Symmetrise)
        {
            var sym = r.Symmetrised;
            w.WriteStartObject("symmetrised");
            w.WriteString("pointGroup", sym.PointGroup);
            w.WriteNumber("operations", sym.Operations);
            Matrix(w, "covariance", sym.Covariance, l * l);
            Numbers(w, "third", sym.ThirdCumulants.Select(x => x.Value), l * l * l);
            Numbers(w, "thirdStdErr", sym.ThirdCumulants.Select(x => x.StandardError), l * l * l);
            Numbers(w, "fourth", sym.FourthCumulants.Select(x => x.Value), l * l * l * l);
            Numbers(w, "fourthStdErr", sym.FourthCumulants.Select(x => x.StandardError), l * l * l * l);
            w.WriteEndObject();
        }
        // To fourth order the Gram–Charlier quasi-moments about the Gaussian of the true mean and covariance are the
        // cumulants themselves (docs/displacements.md), in the same frame, order and units.
        w.WriteStartObject("gramCharlier");
        Numbers(w, "third", r.ThirdCumulants.Select(x => x.Value), l * l * l);
        Numbers(w, "fourth", r.FourthCumulants.Select(x => x.Value), l * l * l * l);
        w.WriteEndObject();
        Number(w, "potentialEnergy", r.PotentialEnergy.Value / e);
        Number(w, "potentialEnergyStdErr", r.PotentialEnergy.StandardError / e);
        w.WriteStartArray("modes");
        foreach (var m in r.Harmonic.Modes)
        {
            w.WriteStartObject();
            Vector(w, "direction", m.Direction, 1);
            Frequency(w, m.Frequency);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteBoolean("atSite", r.StaysAtSite);
        if (r.DebyeWallerB is { } b)
        {
            Number(w, "debyeWallerB", b.Value / l2);
            Number(w, "debyeWallerBStdErr", b.StandardError / l2);
        }
        if (r.StaysAtSite)
        {
            w.WriteStartObject("harmonic");
            Number(w, "meanSquareDisplacement", r.Harmonic.ClassicalMeanSquareDisplacement / l2);
            Number(w, "quantumMeanSquareDisplacement", r.Harmonic.QuantumMeanSquareDisplacement / l2);
            Matrix(w, "covariance", r.Harmonic.ClassicalCovariance, l2);
            Matrix(w, "quantumCovariance", r.Harmonic.QuantumCovariance, l2);
            w.WriteEndObject();
            w.WriteStartObject("firstOrder");
            Vector(w, "meanShift", r.Harmonic.FirstOrderMeanShift, l);
            // The harmonic covariance with its first anharmonic correction, and the leading cumulants (docs/perturbation-theory.md).
            var pert = r.Perturbative;
            var covariance = r.Harmonic.ClassicalCovariance;
            w.WriteStartArray("covariance");
            for (int i = 0; i < 3; i++)
            {
                w.WriteStartArray();
                for (int j = 0; j < 3; j++)
                {
                    w.WriteNumberValue((covariance[i, j] + pert.CovarianceCorrection[i, j]) / l2);
                }
                w.WriteEndArray();
            }
            w.WriteEndArray();
            w.WriteStartObject("cumulants");
            Numbers(w, "third", pert.ThirdCumulants, l2 * l);
            Numbers(w, "fourth", pert.FourthCumulants, l2 * l2);
            w.WriteEndObject();
            w.WriteEndObject();
        }
        if (r.QuantumExact is { } q)
        {
            // Where classical statistics fail: the exact quantum tensor from the oscillator basis (docs/quantum.md).
            w.WriteStartObject("quantumExact");
            Vector(w, "mean", q.Mean, l);
            Matrix(w, "covariance", q.Covariance, l2);
            Number(w, "meanSquareDisplacement", q.MeanSquareDisplacementInAngstromsSquared / l2);
            w.WriteNumber("basisSize", q.BasisSize);
            w.WriteNumber("maxQuanta", q.MaxQuanta);
            w.WriteBoolean("converged", q.Converged);
            w.WriteEndObject();
        }
        var basin = r.Basin;
        w.WriteStartObject("basin");
        w.WriteNumber("shareOutside", r.ShareOutsideBasin);
        Number(w, "barrierToNeighbour", basin.BarrierToNeighbourInElectronVolts / e);
        if (basin.NeighbourMinimum is { } neighbour)
        {
            Vector(w, "neighbourMinimum", neighbour, l);
        }
        Number(w, "riseToWall", basin.RiseToWallInElectronVolts / e);
        w.WriteNumber("otherMinima", basin.OtherMinima.Length);
        Number(w, "harmonicShareAtOtherMinima", basin.OutsidePopulation);
        Number(w, "inscribedRadius", basin.InscribedRadiusInAngstroms / l);
        Number(w, "outerRadius", basin.OuterRadiusInAngstroms / l);
        Number(w, "gridSpacing", basin.GridSpacingInAngstroms / l);
        w.WriteStartArray("populations");
        foreach (var p in r.BasinPopulations)
        {
            w.WriteStartObject();
            w.WriteNumber("index", p.Index);
            if (p.Minimum is { } at)
            {
                Vector(w, "minimum", at, l);
            }
            else
            {
                w.WriteString("kind", "wall");
            }
            Number(w, "energyAboveSite", p.EnergyAboveSiteInElectronVolts / e);
            Number(w, "sampled", p.SampledShare.Value);
            Number(w, "sampledStdErr", p.SampledShare.StandardError);
            Number(w, "harmonic", p.HarmonicShare);
            Number(w, "quadrature", p.QuadratureShare);
            if (p.Mean is { } mean)
            {
                // The draws in this basin alone: their mean and spread about it.
                Vector(w, "mean", mean, l);
                if (p.MeanStandardError is { } meanSe)
                {
                    Vector(w, "meanStdErr", meanSe, l);
                }
                Matrix(w, "covariance", p.Covariance!.Value, l * l);
                Number(w, "meanSquareDisplacement", p.MeanSquareDisplacement!.Value / (l * l));
                Number(w, "meanSquareDisplacementStdErr", p.MeanSquareDisplacement.StandardError / (l * l));
            }
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteStartArray("passes");
        foreach (var p in r.BasinPasses)
        {
            w.WriteStartObject();
            w.WriteStartArray("between");
            w.WriteNumberValue(p.From);
            w.WriteNumberValue(p.To);
            w.WriteEndArray();
            Number(w, "passAboveSite", p.PassAboveSiteInElectronVolts / e);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteEndObject();
        TemperatureFactors(w, r.TemperatureFactors, l);
        if (quantum is not null)
        {
            // Quantum statistics: the keys above are the path integral's; the exact quantum tensor (when the basis reaches
            // this temperature; otherwise a warning says why), the classical run's values, and how the quantum ones were made.
            if (quantum.Exact is { } basis)
            {
                w.WriteStartObject("exact");
                Vector(w, "mean", basis.Mean, l);
                Matrix(w, "covariance", basis.Covariance, l2);
                Number(w, "meanSquareDisplacement", basis.MeanSquareDisplacementInAngstromsSquared / l2);
                w.WriteEndObject();
            }
            var c = quantum.Classical;
            w.WriteStartObject("classical");
            Vector(w, "mean", c.Mean, l);
            Matrix(w, "covariance", c.Covariance, l2);
            Number(w, "meanSquareDisplacement", c.MeanSquareDisplacement.Value / l2);
            Number(w, "meanSquareDisplacementStdErr", c.MeanSquareDisplacement.StandardError / l2);
            Number(w, "debyeWallerB", c.DebyeWallerB?.Value / l2);
            Number(w, "debyeWallerBStdErr", c.DebyeWallerB?.StandardError / l2);
            w.WriteEndObject();
            QuantumDetails(w, quantum.PathIntegral, l, quantum.AtBeads.MeanSquareDisplacement, quantum.AtHalfBeads.MeanSquareDisplacement, "meanSquareDisplacement",
                quantum.KineticEnergy, quantum.ClassicalKineticEnergyInElectronVolts, e,
                quantum.MeanSquareDisplacement.Value / quantum.Classical.MeanSquareDisplacement.Value, [.. r.Harmonic.Modes.Select(m => m.QuantumToThermalRatio)]);
        }
        Common(w, r.Diagnostics, r.Warnings, s);
        w.WriteEndObject();
    }
}
