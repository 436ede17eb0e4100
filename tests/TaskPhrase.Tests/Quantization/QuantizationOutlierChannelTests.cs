using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Tests.Quantization;

/// <summary>The choice of the input channels that stay in fp32 (<c>ModelQuantizer.OutlierChannels</c>), on hand-made weights.</summary>
public sealed class QuantizationOutlierChannelTests
{
    [Fact]
    public void OutlierChannels_PicksTheLargestSmoothedRows_TiesToTheLowerIndex_InAscendingOrder()
    {
        // k = 4 input channels, two weights of n = 2 columns (row-major [k, n]); smoothing scales the rows.
        float[] a = [1, -2, 0.5f, 0.5f, 3, 0, 0.1f, 0.1f];
        float[] b = [0, 0, 0, 4, 0, 0, 0, 0];
        float[] s = [1, 1, 1, 60];
        // Row maxima |s_j · W_jc| over both weights: 2, 4, 3, 6.
        Assert.Equal([3], ModelQuantizer.OutlierChannels([a, b], s, 4, 1));
        Assert.Equal([1, 3], ModelQuantizer.OutlierChannels([a, b], s, 4, 2));
        Assert.Equal([0, 1, 2, 3], ModelQuantizer.OutlierChannels([a, b], s, 4, 9));
        Assert.Empty(ModelQuantizer.OutlierChannels([a, b], s, 4, 0));
        // Equal maxima: the lower index wins.
        Assert.Equal([0], ModelQuantizer.OutlierChannels([[1, 1, 1, 1]], [1, 1], 2, 1));
    }
}
