using System;
using System.Globalization;

namespace ThermalSampling.Landscapes;

/// <summary>A point or displacement in 3D, Cartesian components in Å.</summary>
/// <param name="X">x, Å.</param>
/// <param name="Y">y, Å.</param>
/// <param name="Z">z, Å.</param>
public readonly record struct Position(double X, double Y, double Z)
{
    /// <summary>The origin.</summary>
    public static Position Origin => default;

    /// <summary>The Euclidean length, Å.</summary>
    public double Norm => Math.Sqrt(X * X + Y * Y + Z * Z);

    /// <summary>Component-wise sum.</summary>
    /// <param name="left">The first vector.</param>
    /// <param name="right">The second vector.</param>
    public static Position operator +(Position left, Position right) => new(left.X + right.X, left.Y + right.Y, left.Z + right.Z);

    /// <summary>Component-wise difference.</summary>
    /// <param name="left">The first vector.</param>
    /// <param name="right">The vector subtracted.</param>
    public static Position operator -(Position left, Position right) => new(left.X - right.X, left.Y - right.Y, left.Z - right.Z);

    /// <summary>Scaling.</summary>
    /// <param name="factor">The factor.</param>
    /// <param name="vector">The vector.</param>
    public static Position operator *(double factor, Position vector) => new(factor * vector.X, factor * vector.Y, factor * vector.Z);

    /// <summary>The component with index 0 (x), 1 (y) or 2 (z).</summary>
    /// <param name="index">0, 1 or 2.</param>
    public double this[int index] => index switch
    {
        0 => X,
        1 => Y,
        2 => Z,
        _ => throw new ArgumentOutOfRangeException(nameof(index), index, "index must be 0, 1 or 2."),
    };

    /// <inheritdoc/>
    public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"({X:G6}, {Y:G6}, {Z:G6}) Å");
}

/// <summary>The shape of the region a 3D particle is confined to.</summary>
public enum ConfinementShape
{
    /// <summary>A sphere of a given radius around the centre.</summary>
    Sphere,

    /// <summary>An axis-aligned cube of a given half-width around the centre.</summary>
    Box,
}

/// <summary>The region around a centre that a 3D particle may not leave (hard walls).</summary>
/// <param name="Shape">Sphere or box.</param>
/// <param name="SizeInAngstroms">The radius of the sphere or the half-width of the box, Å.</param>
public readonly record struct Confinement(ConfinementShape Shape, double SizeInAngstroms)
{
    /// <summary>A sphere of radius <paramref name="radius"/>.</summary>
    /// <param name="radius">The radius; must be positive.</param>
    public static Confinement Sphere(Units.Length radius)
        => new(ConfinementShape.Sphere, Internal.Preconditions.CheckPositive(radius.InAngstroms, nameof(radius)));

    /// <summary>A cube of half-width <paramref name="halfWidth"/>.</summary>
    /// <param name="halfWidth">The half-width; must be positive.</param>
    public static Confinement Box(Units.Length halfWidth)
        => new(ConfinementShape.Box, Internal.Preconditions.CheckPositive(halfWidth.InAngstroms, nameof(halfWidth)));

    /// <summary>Whether the displacement (dx, dy, dz) from the centre lies inside.</summary>
    /// <param name="dx">x displacement, Å.</param>
    /// <param name="dy">y displacement, Å.</param>
    /// <param name="dz">z displacement, Å.</param>
    public bool Contains(double dx, double dy, double dz) => Shape == ConfinementShape.Sphere
        ? dx * dx + dy * dy + dz * dz <= SizeInAngstroms * SizeInAngstroms
        : Math.Abs(dx) <= SizeInAngstroms && Math.Abs(dy) <= SizeInAngstroms && Math.Abs(dz) <= SizeInAngstroms;

    /// <summary>The distance from the displacement (dx, dy, dz) to the wall, Å (negative outside).</summary>
    /// <param name="dx">x displacement, Å.</param>
    /// <param name="dy">y displacement, Å.</param>
    /// <param name="dz">z displacement, Å.</param>
    public double DistanceToWall(double dx, double dy, double dz) => Shape == ConfinementShape.Sphere
        ? SizeInAngstroms - Math.Sqrt(dx * dx + dy * dy + dz * dz)
        : SizeInAngstroms - Math.Max(Math.Abs(dx), Math.Max(Math.Abs(dy), Math.Abs(dz)));
}
