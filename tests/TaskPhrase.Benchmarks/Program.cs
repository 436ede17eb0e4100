using BenchmarkDotNet.Running;

// Long-running console modes (Soak.cs, ConcurrencyRun.cs); everything else goes to BenchmarkDotNet.
if (args is ["soak", ..]) return TaskPhrase.Benchmarks.Soak.Run(args[1..]);
if (args is ["concurrency", ..]) return TaskPhrase.Benchmarks.ConcurrencyRun.Run(args[1..]);
BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
return 0;
