using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.Optimization;
using ThermalSampling.Internal;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Landscapes;

/// <summary>
/// One particle in 3D among fixed sites, interacting with each through the same pair potential,
/// confined to a region around a centre: E(x) = Σ_s V(|x − s|).
/// </summary>
/// <typeparam name="TPotential">The pair potential.</typeparam>
public sealed class SiteLandscape<TPotential> where TPotential : struct, IPairPotential
{
    private readonly double[] _coordinates; // x0, y0, z0, x1, ... for the hot loops
    private readonly TPotential[] _potentials; // per site

    internal SiteLandscape(TPotential potential, ImmutableArray<Position> sites, Position centre, Confinement confinement)
        : this([.. sites.Select(_ => potential)], sites, [.. sites.Select(_ => "")], centre, confinement, null)
    {
    }

    /// <param name="potentials">Each site's potential, sites of one species together (the order of <see cref="Groups"/>).</param>
    /// <param name="sites">The sites in that order.</param>
    /// <param name="species">Each site's species label ("" when the landscape has one species).</param>
    /// <param name="centre">The centre.</param>
    /// <param name="confinement">The confinement.</param>
    /// <param name="rule">The mixing rule that made the pair potentials, for the description, or null.</param>
    /// <param name="field">A smooth energy added to the pair terms, eV, or null.</param>
    internal SiteLandscape(TPotential[] potentials, ImmutableArray<Position> sites, ImmutableArray<string> species, Position centre, Confinement confinement, string? rule,
        PolynomialField? field = null)
    {
        Field = field;
        Potential = potentials[0];
        _potentials = potentials;
        Sites = sites;
        SiteSpecies = species;
        Centre = centre;
        Confinement = confinement;
        MixingRule = rule;
        _coordinates = new double[3 * sites.Length];
        for (int i = 0; i < sites.Length; i++)
        {
            _coordinates[3 * i] = sites[i].X;
            _coordinates[3 * i + 1] = sites[i].Y;
            _coordinates[3 * i + 2] = sites[i].Z;
        }
        var groups = ImmutableArray.CreateBuilder<(int Start, int Count)>();
        for (int i = 0; i < sites.Length;)
        {
            int j = i + 1;
            while (j < sites.Length && species[j] == species[i] && potentials[j].Equals(potentials[i]))
            {
                j++;
            }
            groups.Add((i, j - i));
            i = j;
        }
        Groups = groups.ToImmutable();
    }

    /// <summary>The pair potential between the particle and each site (with several species: the first site's; <see cref="SitePotentials"/> has each).</summary>
    public TPotential Potential { get; }

    /// <summary>Each site's pair potential with the particle, in the order of <see cref="Sites"/>.</summary>
    public ImmutableArray<TPotential> SitePotentials => [.. _potentials];

    /// <summary>Each site's species label ("" for a one-species landscape), in the order of <see cref="Sites"/>.</summary>
    public ImmutableArray<string> SiteSpecies { get; }

    /// <summary>The mixing rule that made the pair potentials (named in reports), or null when they were given.</summary>
    public string? MixingRule { get; }

    /// <summary>A smooth energy added to the pair terms (eV; for example the Coulomb energy of an ion in its crystal's field, <see cref="CoulombSite"/>), or null.</summary>
    public PolynomialField? Field { get; }

    /// <summary>The same landscape with <paramref name="field"/> (eV) added to its energy.</summary>
    /// <param name="field">The field, eV, fitted over at least the confinement.</param>
    public SiteLandscape<TPotential> WithField(PolynomialField field)
    {
        Preconditions.CheckNotNull(field, nameof(field));
        return new SiteLandscape<TPotential>(_potentials, Sites, SiteSpecies, Centre, Confinement, MixingRule, field);
    }

    /// <summary>Runs of consecutive sites that share one species and potential: the kernels evaluate a group's potential for all its sites.</summary>
    internal ImmutableArray<(int Start, int Count)> Groups { get; }

    /// <summary>The potential of group <paramref name="g"/>.</summary>
    internal TPotential GroupPotential(int g) => _potentials[Groups[g].Start];

    /// <summary>Whether every site has the same species and potential.</summary>
    internal bool OneSpecies => Groups.Length == 1;

    /// <summary>For the kernels: each group's potential and the end of its sites in <see cref="PackedCoordinates"/> (3 per site).</summary>
    internal (TPotential[] Potentials, int[] Ends) KernelGroups()
        => ([.. Groups.Select(g => _potentials[g.Start])], [.. Groups.Select(g => 3 * (g.Start + g.Count))]);

    /// <summary>The fixed sites, Å.</summary>
    public ImmutableArray<Position> Sites { get; }

    /// <summary>The centre of the confinement region (the particle's start), Å.</summary>
    public Position Centre { get; }

    /// <summary>The region the particle may not leave.</summary>
    public Confinement Confinement { get; }

    /// <summary>The site coordinates packed as x0, y0, z0, x1, … (Å), for kernels.</summary>
    internal ReadOnlySpan<double> PackedCoordinates => _coordinates;

    /// <summary>Whether <paramref name="position"/> lies inside the confinement.</summary>
    /// <param name="position">The position, Å.</param>
    public bool Contains(Position position)
        => Confinement.Contains(position.X - Centre.X, position.Y - Centre.Y, position.Z - Centre.Z);

    /// <summary>The energy at <paramref name="position"/>, eV.</summary>
    /// <param name="position">The position, Å.</param>
    public double Energy(Position position)
    {
        double sum = 0;
        var c = _coordinates;
        for (int i = 0; i < c.Length; i += 3)
        {
            double dx = position.X - c[i], dy = position.Y - c[i + 1], dz = position.Z - c[i + 2];
            sum += _potentials[i / 3].EnergyAtSquaredDistance(dx * dx + dy * dy + dz * dz);
        }
        return Field is null ? sum : sum + Field.Value(position);
    }

    /// <summary>The gradient ∂E/∂x at <paramref name="position"/>, eV/Å.</summary>
    /// <param name="position">The position, Å.</param>
    public Position Gradient(Position position)
    {
        double gx = 0, gy = 0, gz = 0;
        for (int site = 0; site < Sites.Length; site++)
        {
            var d = position - Sites[site];
            double r = d.Norm;
            double f = _potentials[site].Derivatives(r).First / r;
            gx += f * d.X;
            gy += f * d.Y;
            gz += f * d.Z;
        }
        if (Field is { } field)
        {
            (gx, gy, gz) = (gx + field.Derivative(position, 1, 0, 0), gy + field.Derivative(position, 0, 1, 0), gz + field.Derivative(position, 0, 0, 1));
        }
        return new Position(gx, gy, gz);
    }

    /// <summary>The Hessian ∂²E/∂xᵢ∂xⱼ at <paramref name="position"/>, eV/Å², as a new 3×3 matrix.</summary>
    /// <param name="position">The position, Å.</param>
    public Matrix<double> Hessian(Position position)
    {
        var h = Matrix<double>.Build.Dense(3, 3);
        for (int site = 0; site < Sites.Length; site++)
        {
            var d = position - Sites[site];
            double r = d.Norm;
            var pd = _potentials[site].Derivatives(r);
            double a = pd.Second - pd.First / r, b = pd.First / r;
            for (int i = 0; i < 3; i++)
            {
                double ni = d[i] / r;
                for (int j = 0; j < 3; j++)
                {
                    h[i, j] += a * ni * d[j] / r + (i == j ? b : 0);
                }
            }
        }
        AddField(position, 2, (index, value) => h[index[0], index[1]] += value);
        return h;
    }

    /// <summary>The third-derivative tensor ∂³E/∂xᵢ∂xⱼ∂xₖ at <paramref name="position"/>, eV/Å³.</summary>
    /// <param name="position">The position, Å.</param>
    /// <remarks>For one pair with unit vector n: T = (V‴ − 3V″/r + 3V′/r²) nᵢnⱼnₖ + ((V″ − V′/r)/r)(δᵢⱼnₖ + δᵢₖnⱼ + δⱼₖnᵢ).</remarks>
    public double[,,] ThirdDerivatives(Position position)
    {
        var t = new double[3, 3, 3];
        Span<double> n = stackalloc double[3];
        for (int site = 0; site < Sites.Length; site++)
        {
            var d = position - Sites[site];
            double r = d.Norm;
            var pd = _potentials[site].Derivatives(r);
            double cnnn = pd.Third - 3 * pd.Second / r + 3 * pd.First / (r * r);
            double cdn = (pd.Second - pd.First / r) / r;
            n[0] = d.X / r;
            n[1] = d.Y / r;
            n[2] = d.Z / r;
            for (int i = 0; i < 3; i++)
            {
                for (int j = 0; j < 3; j++)
                {
                    for (int k = 0; k < 3; k++)
                    {
                        t[i, j, k] += cnnn * n[i] * n[j] * n[k]
                            + cdn * ((i == j ? n[k] : 0) + (i == k ? n[j] : 0) + (j == k ? n[i] : 0));
                    }
                }
            }
        }
        AddField(position, 3, (index, value) => t[index[0], index[1], index[2]] += value);
        return t;
    }

    /// <summary>The fourth-derivative tensor ∂⁴E/∂xᵢ∂xⱼ∂xₖ∂xₗ at <paramref name="position"/>, eV/Å⁴.</summary>
    /// <param name="position">The position, Å.</param>
    /// <remarks>
    /// For one pair with unit vector n: A nᵢnⱼnₖnₗ + B (δᵢⱼnₖnₗ and its five other placements of δ) + C (δᵢⱼδₖₗ + δᵢₖδⱼₗ +
    /// δᵢₗδⱼₖ), with A = V⁗ − 6V‴/r + 15V″/r² − 15V′/r³, B = (V‴ − 3V″/r + 3V′/r²)/r and C = (V″ − V′/r)/r² (the chain
    /// rule for a function of r = |x|; checked against finite differences of <see cref="ThirdDerivatives"/> in the tests).
    /// </remarks>
    public double[,,,] FourthDerivatives(Position position)
    {
        var f = new double[3, 3, 3, 3];
        Span<double> n = stackalloc double[3];
        for (int site = 0; site < Sites.Length; site++)
        {
            var d = position - Sites[site];
            double r = d.Norm;
            var pd = _potentials[site].Derivatives(r);
            double a = pd.Fourth - 6 * pd.Third / r + 15 * pd.Second / (r * r) - 15 * pd.First / (r * r * r);
            double b = (pd.Third - 3 * pd.Second / r + 3 * pd.First / (r * r)) / r;
            double c = (pd.Second - pd.First / r) / (r * r);
            (n[0], n[1], n[2]) = (d.X / r, d.Y / r, d.Z / r);
            for (int i = 0; i < 3; i++)
            {
                for (int j = 0; j < 3; j++)
                {
                    for (int k = 0; k < 3; k++)
                    {
                        for (int l = 0; l < 3; l++)
                        {
                            double ij = i == j ? 1 : 0, ik = i == k ? 1 : 0, il = i == l ? 1 : 0, jk = j == k ? 1 : 0, jl = j == l ? 1 : 0, kl = k == l ? 1 : 0;
                            f[i, j, k, l] += a * n[i] * n[j] * n[k] * n[l]
                                + b * (ij * n[k] * n[l] + ik * n[j] * n[l] + il * n[j] * n[k] + jk * n[i] * n[l] + jl * n[i] * n[k] + kl * n[i] * n[j])
                                + c * (ij * kl + ik * jl + il * jk);
                        }
                    }
                }
            }
        }
        AddField(position, 4, (index, value) => f[index[0], index[1], index[2], index[3]] += value);
        return f;
    }

    /// <summary>Adds the field's derivatives of <paramref name="order"/> at every index tuple (each axis 0–2) through <paramref name="add"/>.</summary>
    private void AddField(Position position, int order, Action<int[], double> add)
    {
        if (Field is not { } field)
        {
            return;
        }
        var index = new int[order];
        for (int flat = 0; flat < (int)Math.Pow(3, order); flat++)
        {
            int rest = flat;
            var counts = new int[3];
            for (int q = 0; q < order; q++)
            {
                index[q] = rest % 3;
                counts[index[q]]++;
                rest /= 3;
            }
            add(index, field.Derivative(position, counts[0], counts[1], counts[2]));
        }
    }

    /// <summary>
    /// The local minimum of the energy nearest the centre, by BFGS (MathNet.Numerics) from the centre.
    /// </summary>
    /// <exception cref="LandscapeException">When the search leaves the confinement or does not converge:
    /// the particle has no bound position inside the region.</exception>
    public Position FindMinimum()
    {
        var objective = ObjectiveFunction.Gradient(v =>
        {
            var p = new Position(v[0], v[1], v[2]);
            var g = Gradient(p);
            return (Energy(p), Vector<double>.Build.Dense(new[] { g.X, g.Y, g.Z }));
        });
        var start = Vector<double>.Build.Dense(new[] { Centre.X, Centre.Y, Centre.Z });
        MinimizationResult result;
        try
        {
            result = new BfgsMinimizer(1e-10, 1e-12, 1e-14, 2000).FindMinimum(objective, start);
        }
        catch (MaximumIterationsException ex)
        {
            throw new LandscapeException("The minimum search from the centre did not converge in 2000 BFGS iterations; the energy surface may be flat or the sites badly placed.", ex);
        }
        catch (Exception ex) when (ex is not LandscapeException)
        {
            throw new LandscapeException("The minimum search from the centre failed: " + ex.Message, ex);
        }
        var m = result.MinimizingPoint;
        var min = new Position(m[0], m[1], m[2]);
        if (!Contains(min))
        {
            throw new LandscapeException(string.Create(CultureInfo.InvariantCulture,
                $"The energy minimum reached from the centre, {min}, lies outside the confinement ({Confinement.Shape} of size {Confinement.SizeInAngstroms:G6} Å around {Centre}); the particle is not bound there."));
        }
        return min;
    }

    /// <summary>A description for reports.</summary>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"{Sites.Length} fixed sites, {Confinement.Shape.ToString().ToLowerInvariant()} confinement of size {Confinement.SizeInAngstroms:G6} Å around {Centre}, {PotentialsDescription}");

    private string PotentialsDescription => OneSpecies ? Potential.Description
        : string.Join("; ", Groups.Select(g => $"{g.Count} × {(SiteSpecies[g.Start].Length > 0 ? SiteSpecies[g.Start] + ": " : "")}{_potentials[g.Start].Description}"))
            + (MixingRule is null ? "" : $" ({MixingRule} mixing)");
}

/// <summary>Factories for <see cref="SiteLandscape{TPotential}"/>.</summary>
public static class SiteLandscape
{
    /// <summary>The smallest distance (Å) allowed between two sites, or between a site and the centre.</summary>
    public const double MinimumSeparationInAngstroms = 1e-3;

    /// <summary>
    /// A particle among sites of several species, each species with its own pair potential with the particle (all of one
    /// type: give different forms as <see cref="PairForm"/>). Sites are kept species by species in the order the species
    /// first appear (<see cref="SiteLandscape{TPotential}.Sites"/> lists them so), so that the kernels evaluate one
    /// potential per run of sites.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="sites">Each fixed site with its species label.</param>
    /// <param name="potentials">The pair potential of each species present (a species without one is an error naming it; give a zero <see cref="PairForm.None"/> for none).</param>
    /// <param name="centre">The start and centre of the confinement, Å.</param>
    /// <param name="confinement">The region around the centre.</param>
    /// <param name="mixingRule">The rule that made the potentials, named in reports (for example "Lorentz–Berthelot"), or null.</param>
    public static SiteLandscape<TPotential> CreateWithSpecies<TPotential>(IEnumerable<(Position Site, string Species)> sites, IReadOnlyDictionary<string, TPotential> potentials,
        Position centre, Confinement confinement, string? mixingRule = null)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(sites, nameof(sites));
        Preconditions.CheckNotNull(potentials, nameof(potentials));
        var list = sites.ToList();
        var missing = list.Select(s => s.Species).Distinct().Where(k => !potentials.ContainsKey(k)).ToList();
        if (missing.Count > 0)
        {
            throw new ArgumentException($"potentials has no entry for species {string.Join(", ", missing)}; give each species present its pair potential (PairForm.None for none).", nameof(potentials));
        }
        var order = list.Select(s => s.Species).Distinct().ToList();
        var grouped = list.Select((s, i) => (s, i)).OrderBy(t => order.IndexOf(t.s.Species)).ThenBy(t => t.i).Select(t => t.s).ToList();
        // The one-species checks (finite, not on the centre, not coincident, the potential's domain) on every species.
        foreach (var species in order)
        {
            _ = Create(potentials[species], grouped.Where(s => s.Species == species).Select(s => s.Site), centre, confinement);
        }
        var all = grouped.Select(s => s.Site).ToList();
        for (int i = 0; i < all.Count; i++)
        {
            for (int j = i + 1; j < all.Count; j++)
            {
                if ((all[i] - all[j]).Norm < MinimumSeparationInAngstroms)
                {
                    throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"sites {all[i]} ({grouped[i].Species}) and {all[j]} ({grouped[j].Species}) coincide."), nameof(sites));
                }
            }
        }
        return new SiteLandscape<TPotential>([.. grouped.Select(s => potentials[s.Species])], [.. all], [.. grouped.Select(s => s.Species)], centre, confinement, mixingRule);
    }

    /// <summary>A particle among <paramref name="sites"/>, confined around <paramref name="centre"/>.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The pair potential between the particle and each site.</param>
    /// <param name="sites">The fixed sites, Å; at least one, all finite, no two closer than <see cref="MinimumSeparationInAngstroms"/>.</param>
    /// <param name="centre">The start and centre of the confinement, Å; not on a site.</param>
    /// <param name="confinement">The region around the centre.</param>
    public static SiteLandscape<TPotential> Create<TPotential>(TPotential potential, IEnumerable<Position> sites, Position centre, Confinement confinement)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(sites, nameof(sites));
        var list = ImmutableArray.CreateRange(sites);
        if (list.IsEmpty)
        {
            throw new ArgumentException("sites is empty; a site landscape needs at least one fixed site.", nameof(sites));
        }
        Preconditions.CheckFinite(centre.X, "centre.X");
        Preconditions.CheckFinite(centre.Y, "centre.Y");
        Preconditions.CheckFinite(centre.Z, "centre.Z");
        Preconditions.CheckPositive(confinement.SizeInAngstroms, "confinement.SizeInAngstroms");
        if (!Enum.IsDefined(confinement.Shape))
        {
            throw new ArgumentOutOfRangeException(nameof(confinement), confinement.Shape, "confinement.Shape must be Sphere or Box.");
        }
        for (int i = 0; i < list.Length; i++)
        {
            var s = list[i];
            Preconditions.CheckFinite(s.X, $"sites[{i}].X");
            Preconditions.CheckFinite(s.Y, $"sites[{i}].Y");
            Preconditions.CheckFinite(s.Z, $"sites[{i}].Z");
            double toCentre = (s - centre).Norm;
            if (toCentre < MinimumSeparationInAngstroms)
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                    $"sites[{i}] = {s} coincides with the centre {centre} (distance {toCentre:R} Å); the particle cannot start on a site."), nameof(sites));
            }
            if (toCentre < Math.Max(potential.DomainLower, 0))
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                    $"sites[{i}] = {s} is {toCentre:R} Å from the centre, inside the potential's lower domain bound {potential.DomainLower:R} Å."), nameof(sites));
            }
            for (int j = 0; j < i; j++)
            {
                double d = (s - list[j]).Norm;
                if (d < MinimumSeparationInAngstroms)
                {
                    throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                        $"sites[{i}] = {s} and sites[{j}] = {list[j]} are on top of each other (distance {d:R} Å); remove the duplicate."), nameof(sites));
                }
            }
        }
        return new SiteLandscape<TPotential>(potential, list, centre, confinement);
    }

    /// <summary>
    /// A particle above a surface (<see cref="LatticeSites.Surface"/>), confined around the geometry's start. A surface has
    /// vacuum on one side only: the confinement must not reach below the slab's deepest layer, nor past the slab's edge
    /// (less than one nearest-neighbour distance from it), or the particle could pass under or around the slab, which
    /// is an error in the landscape, not a displacement.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The pair potential between the particle and each substrate atom.</param>
    /// <param name="surface">The slab and the start above the site.</param>
    /// <param name="confinement">The region around the start.</param>
    /// <exception cref="ArgumentException">When the confinement reaches below or past the slab (the message says by how much and what to change).</exception>
    public static SiteLandscape<TPotential> AboveSurface<TPotential>(TPotential potential, AdsorptionGeometry surface, Confinement confinement)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(surface, nameof(surface));
        Preconditions.CheckPositive(confinement.SizeInAngstroms, "confinement.SizeInAngstroms");
        double size = confinement.SizeInAngstroms;
        double deepest = surface.Sites.Min(s => s.Z);
        double lowest = surface.Start.Z - size;
        if (lowest < deepest)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"confinement of size {size:G4} Å around the start at height {surface.Start.Z:G4} Å reaches z = {lowest:G4} Å, below the slab's deepest layer at z = {deepest:G4} Å: a surface has vacuum on one side only, so the particle could pass under the slab. Make the confinement at most {surface.Start.Z - deepest:G4} Å, or build the slab with more layers."),
                nameof(confinement));
        }
        double reach = confinement.Shape == ConfinementShape.Sphere ? size : size * Math.Sqrt(2);
        double room = surface.LateralRadiusInAngstroms - surface.NearestNeighbourDistanceInAngstroms;
        if (reach > room)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"confinement of size {size:G4} Å reaches {reach:G4} Å sideways from the site, within one neighbour distance of the slab's edge ({surface.LateralRadiusInAngstroms:G4} Å from the site): the particle could walk off the slab. Make the confinement smaller, or build the slab with a larger lateral radius (at least {(reach / surface.NearestNeighbourDistanceInAngstroms) + 1:G3} neighbour distances)."),
                nameof(confinement));
        }
        return Create(potential, surface.Sites, surface.Start, confinement);
    }
}

/// <summary>Thrown when a landscape has no usable answer: no bound minimum inside the region, or a failed search.</summary>
public sealed class LandscapeException : InvalidOperationException
{
    /// <summary>Creates the exception.</summary>
    /// <param name="message">What went wrong and what to do.</param>
    public LandscapeException(string message) : base(message) { }

    /// <summary>Creates the exception with an inner cause.</summary>
    /// <param name="message">What went wrong and what to do.</param>
    /// <param name="innerException">The cause.</param>
    public LandscapeException(string message, Exception innerException) : base(message, innerException) { }
}
