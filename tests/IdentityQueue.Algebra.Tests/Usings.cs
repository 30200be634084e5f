namespace IdentityQueue.Algebra.Tests;
