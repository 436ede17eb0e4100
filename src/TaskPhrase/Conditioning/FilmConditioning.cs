namespace TaskPhrase.Conditioning;

/// <summary>
/// FiLM conditioning for a downstream decoder (Perez et al., 2018): one (γ, β) pair per decoder layer,
/// computed from the embedding of an approved phrase. Immutable.
/// </summary>
/// <param name="Layers">The per-layer vectors, layer 0 first.</param>
public sealed record FilmConditioning(IReadOnlyList<FilmLayer> Layers);

/// <summary>γ and β for one decoder layer; both have the layer's width.</summary>
/// <param name="Gamma">The scale vector γ.</param>
/// <param name="Beta">The shift vector β.</param>
public sealed record FilmLayer(float[] Gamma, float[] Beta);
