using System.Collections.Immutable;
using System.Linq;

namespace ThermalSampling.Analysis;

/// <summary>
/// The labels of the independent components of symmetric tensors in three dimensions (1, 2, 3 = x, y, z of the
/// landscape's frame), in the order every report, document and output uses: second order 11, 12, 13, 22, 23, 33; third
/// 111, 112, …, 333 (10); fourth 1111, 1112, …, 3333 (15).
/// </summary>
public static class TensorComponents
{
    /// <summary>The 6 second-order labels (the covariance).</summary>
    public static ImmutableArray<string> Second { get; } = Labels(Internal.TensorIndices.Second);

    /// <summary>The 10 third-order labels (the third cumulant).</summary>
    public static ImmutableArray<string> Third { get; } = Labels(Internal.TensorIndices.Third);

    /// <summary>The 15 fourth-order labels (the fourth cumulant).</summary>
    public static ImmutableArray<string> Fourth { get; } = Labels(Internal.TensorIndices.Fourth);

    private static ImmutableArray<string> Labels(int[][] tuples) => [.. tuples.Select(t => string.Concat(t.Select(i => (char)('1' + i))))];
}
