namespace TaskPhrase.Registry;

/// <summary>
/// The binding of a task to a downstream learned controller in the host app: which low-dimensional
/// motion manifold to switch to, how many joystick axes it takes, and optionally a decoder file.
/// </summary>
/// <param name="Manifold">Id of the learned controller in the host app, e.g. <c>pour-arc.v2</c>.</param>
/// <param name="LatentDims">Number of latent (joystick) dimensions the controller takes; at least 1.</param>
/// <param name="Decoder">Optional path of the decoder weights, as written in the registry.</param>
public sealed record ControllerBinding(string Manifold, int LatentDims, string? Decoder = null);
