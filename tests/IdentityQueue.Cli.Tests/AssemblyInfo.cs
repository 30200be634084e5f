// Hangfire keeps process-wide state (GlobalConfiguration, JobStorage.Current). In real use each idq process runs one
// worker host; these tests run `idq run` in-process, and two hosts at once in one test process were seen to hand a job
// to the other host's store. The tests of this assembly therefore run one at a time (the worker processes they start run
// in parallel as they would in production).
[assembly: CollectionBehavior(DisableTestParallelization = true)]
