// Property tests run with a fixed FsCheck seed so that CI is reproducible; change the seed deliberately to explore.
[assembly: FsCheck.Xunit.Properties(Replay = "20261202,1")]
