namespace IdentityQueue.Screening;
