using System.Collections.Generic;

namespace ThermalSampling.Internal;

/// <summary>
/// The independent components of fully symmetric tensors in three dimensions, as sorted index tuples in lexicographic
/// order (0, 1, 2 = x, y, z): second order 11, 12, 13, 22, 23, 33; third 111, 112, …, 333 (10); fourth 1111, …, 3333 (15).
/// The order of the reports and of the JSON contract.
/// </summary>
internal static class TensorIndices
{
    internal static readonly int[][] Second = Tuples(2), Third = Tuples(3), Fourth = Tuples(4);

    private static int[][] Tuples(int order)
    {
        var list = new List<int[]>();
        void Build(int[] prefix, int from)
        {
            if (prefix.Length == order)
            {
                list.Add(prefix);
                return;
            }
            for (int i = from; i < 3; i++)
            {
                Build([.. prefix, i], i);
            }
        }
        Build([], 0);
        return [.. list];
    }
}
