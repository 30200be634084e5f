namespace IdentityQueue.Screening.Tests;
