namespace FilmDecoderDemo;

/// <summary>One decoded arm action: a velocity per joint in rad/s, and whether a limit clipped it.</summary>
/// <param name="Velocities">Joint velocities, joint 1 first, in rad/s.</param>
/// <param name="Clipped">True when at least one joint was limited.</param>
/// <param name="AtRest">True when the joystick was inside the dead zone (no motion).</param>
internal sealed record JointCommand(IReadOnlyList<float> Velocities, bool Clipped, bool AtRest);
