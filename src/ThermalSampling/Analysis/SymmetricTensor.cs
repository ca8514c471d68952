using System;
using System.Globalization;
using MathNet.Numerics.LinearAlgebra;

namespace ThermalSampling.Analysis;

/// <summary>A symmetric 3×3 tensor (a displacement covariance in Å², a Hessian in eV/Å²), immutable.</summary>
/// <param name="XX">xx component.</param>
/// <param name="YY">yy component.</param>
/// <param name="ZZ">zz component.</param>
/// <param name="XY">xy = yx component.</param>
/// <param name="XZ">xz = zx component.</param>
/// <param name="YZ">yz = zy component.</param>
public readonly record struct SymmetricTensor(double XX, double YY, double ZZ, double XY, double XZ, double YZ)
{
    /// <summary>The trace XX + YY + ZZ.</summary>
    public double Trace => XX + YY + ZZ;

    /// <summary>The component (i, j), indices 0..2.</summary>
    /// <param name="i">Row, 0..2.</param>
    /// <param name="j">Column, 0..2.</param>
    public double this[int i, int j] => (Math.Min(i, j), Math.Max(i, j)) switch
    {
        (0, 0) => XX,
        (1, 1) => YY,
        (2, 2) => ZZ,
        (0, 1) => XY,
        (0, 2) => XZ,
        (1, 2) => YZ,
        _ => throw new ArgumentOutOfRangeException(nameof(i), $"indices ({i}, {j}) must each be 0, 1 or 2."),
    };

    /// <summary>The quadratic form vᵀTv.</summary>
    /// <param name="v">The vector.</param>
    public double Quadratic(Landscapes.Position v)
        => XX * v.X * v.X + YY * v.Y * v.Y + ZZ * v.Z * v.Z + 2 * (XY * v.X * v.Y + XZ * v.X * v.Z + YZ * v.Y * v.Z);

    /// <summary>The tensor as a new dense MathNet matrix.</summary>
    public Matrix<double> ToMatrix() => Matrix<double>.Build.DenseOfArray(new[,] { { XX, XY, XZ }, { XY, YY, YZ }, { XZ, YZ, ZZ } });

    /// <summary>Builds the tensor from the symmetric part of a 3×3 matrix, ½(M + Mᵀ).</summary>
    /// <param name="matrix">A 3×3 matrix.</param>
    public static SymmetricTensor FromMatrix(Matrix<double> matrix)
    {
        Internal.Preconditions.CheckNotNull(matrix, nameof(matrix));
        if (matrix.RowCount != 3 || matrix.ColumnCount != 3)
        {
            throw new ArgumentException($"matrix is {matrix.RowCount}×{matrix.ColumnCount}; it must be 3×3.", nameof(matrix));
        }
        return new(matrix[0, 0], matrix[1, 1], matrix[2, 2],
            0.5 * (matrix[0, 1] + matrix[1, 0]), 0.5 * (matrix[0, 2] + matrix[2, 0]), 0.5 * (matrix[1, 2] + matrix[2, 1]));
    }

    /// <summary>The eigenvalues in ascending order (MathNet symmetric eigen-decomposition).</summary>
    public (double Smallest, double Middle, double Largest) Eigenvalues()
    {
        var values = ToMatrix().Evd(Symmetricity.Symmetric).EigenValues;
        return (values[0].Real, values[1].Real, values[2].Real);
    }

    /// <inheritdoc/>
    public override string ToString() => string.Create(CultureInfo.InvariantCulture,
        $"[[{XX:G6}, {XY:G6}, {XZ:G6}], [{XY:G6}, {YY:G6}, {YZ:G6}], [{XZ:G6}, {YZ:G6}, {ZZ:G6}]]");
}
