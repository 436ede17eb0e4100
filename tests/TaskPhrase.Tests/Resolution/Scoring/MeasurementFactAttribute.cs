namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// A fact that runs only when the environment variable <c>TASKPHRASE_MEASURE</c> is <c>1</c>: measurements that take
/// minutes and regenerate documented tables, kept out of the default test run.
/// </summary>
public sealed class MeasurementFactAttribute : FactAttribute
{
    public MeasurementFactAttribute()
    {
        if (Environment.GetEnvironmentVariable("TASKPHRASE_MEASURE") != "1")
            Skip = "Measurement (minutes): set TASKPHRASE_MEASURE=1 to run it.";
    }
}
