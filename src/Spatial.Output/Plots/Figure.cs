namespace Spatial.Output.Plots;

/// <summary>A rendered plot: PNG bytes and SVG markup of the same drawing, with its title and a one-line caption.</summary>
/// <param name="Title">Title.</param>
/// <param name="Caption">What the plot shows, for the report.</param>
/// <param name="Png">PNG bytes.</param>
/// <param name="Svg">SVG markup.</param>
public sealed record Figure(string Title, string Caption, byte[] Png, string Svg);
