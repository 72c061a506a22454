using System.Runtime.CompilerServices;

namespace PulseLadder.Kernels;

/// <summary>
/// A pinned array of doubles whose first element used is 64-byte aligned (one cache line, one 512-bit vector),
/// so vector loads never straddle cache lines. Grows on demand; never shrinks.
/// </summary>
internal sealed unsafe class AlignedBuffer
{
    private double[] _array = [];
    private int _offset;

    public int Capacity { get; private set; }

    /// <summary>Aligned pointer to element 0; valid while this buffer lives (the array is pinned).</summary>
    public double* Pointer { get; private set; }

    public void EnsureCapacity(int length)
    {
        if (length <= Capacity) return;
        int cap = Math.Max(length, Capacity + Capacity / 2);
        _array = GC.AllocateUninitializedArray<double>(cap + 8, pinned: true);
        double* p = (double*)Unsafe.AsPointer(ref _array[0]);
        _offset = (int)(((64 - ((nuint)p & 63)) & 63) / sizeof(double));
        Pointer = p + _offset;
        Capacity = cap;
    }

    public Span<double> AsSpan(int length) => _array.AsSpan(_offset, length);
}
