using Microsoft.EntityFrameworkCore;

namespace IdentityQueue.Store.Schema;

/// <summary>
/// The EF Core model of the store. Table and column names are the public SQL face of SPEC §4 and are spelled out
/// here (snake_case, explicit ToTable/HasColumnName), never derived from the CLR names. The model is provider-neutral:
/// no provider-specific column types or SQL, so the SQLite and PostgreSQL migration projects share it. Not thread-safe
/// (as every DbContext); one per unit of work.
/// </summary>
public sealed class IdentityStoreContext(DbContextOptions<IdentityStoreContext> options) : DbContext(options)
{
    public DbSet<CatalogueRow> Catalogues => Set<CatalogueRow>();
    public DbSet<CandidateRow> Candidates => Set<CandidateRow>();
    public DbSet<ResultRow> Results => Set<ResultRow>();
    public DbSet<TrialRow> Trials => Set<TrialRow>();
    public DbSet<RejectionRow> Rejections => Set<RejectionRow>();
    public DbSet<WorkerRow> Workers => Set<WorkerRow>();
    public DbSet<CounterexampleRow> Counterexamples => Set<CounterexampleRow>();
    public DbSet<RecoveredDifferenceRow> RecoveredDifferences => Set<RecoveredDifferenceRow>();
    public DbSet<EquivalenceRow> Equivalences => Set<EquivalenceRow>();
    public DbSet<OpenFamilyRow> OpenFamilies => Set<OpenFamilyRow>();
    public DbSet<VersionEntryRow> VersionEntries => Set<VersionEntryRow>();

    private const string Now = "CURRENT_TIMESTAMP";

    protected override void OnModelCreating(ModelBuilder modelBuilder)
    {
        modelBuilder.Entity<CatalogueRow>(e =>
        {
            e.ToTable("catalogue");
            e.HasKey(x => x.Id).HasName("pk_catalogue");
            e.Property(x => x.Id).HasColumnName("id");
            e.Property(x => x.Name).HasColumnName("name");
            e.Property(x => x.Source).HasColumnName("source");
            e.Property(x => x.ImportedAt).HasColumnName("imported_at").HasDefaultValueSql(Now);
            e.Property(x => x.Seed).HasColumnName("seed").HasDefaultValue(0L);
            e.Property(x => x.TargetBits).HasColumnName("target_bits").HasDefaultValue(64);
            e.Property(x => x.KeyScheme).HasColumnName("key_scheme").HasDefaultValue(1);
            e.Property(x => x.Entries).HasColumnName("entries");
            e.Property(x => x.Instances).HasColumnName("instances");
            e.Property(x => x.Rejections).HasColumnName("rejections");
            e.Property(x => x.Version).HasColumnName("version").HasDefaultValue(1);
            e.HasIndex(x => x.Name).IsUnique().HasDatabaseName("ux_catalogue_name");
        });

        modelBuilder.Entity<CandidateRow>(e =>
        {
            e.ToTable("candidate");
            e.HasKey(x => x.Id).HasName("pk_candidate");
            e.Property(x => x.Id).HasColumnName("id");
            e.Property(x => x.CatalogueId).HasColumnName("catalogue_id");
            e.Property(x => x.Label).HasColumnName("label");
            e.Property(x => x.Family).HasColumnName("family");
            e.Property(x => x.Params).HasColumnName("params");
            e.Property(x => x.Lhs).HasColumnName("lhs");
            e.Property(x => x.Rhs).HasColumnName("rhs");
            e.Property(x => x.Field).HasColumnName("field").HasDefaultValue("Q");
            e.Property(x => x.CreatedAt).HasColumnName("created_at").HasDefaultValueSql(Now);
            e.Property(x => x.Position).HasColumnName("position");
            e.Property(x => x.LhsColumn).HasColumnName("lhs_column");
            e.Property(x => x.RhsColumn).HasColumnName("rhs_column");
            e.HasOne<CatalogueRow>().WithMany().HasForeignKey(x => x.CatalogueId)
                .HasConstraintName("fk_candidate_catalogue").OnDelete(DeleteBehavior.Cascade);
            // The families view groups by (catalogue_id, family) and orders instances by position.
            e.HasIndex(x => new { x.CatalogueId, x.Family, x.Position }).HasDatabaseName("ix_candidate_catalogue_family");
            e.HasIndex(x => x.Label).HasDatabaseName("ix_candidate_label");
        });

        modelBuilder.Entity<ResultRow>(e =>
        {
            e.ToTable("result", t => t.HasCheckConstraint("ck_result_state",
                "state IN (" + string.Join(", ", ResultStates.All.Select(s => $"'{s}'")) + ")"));
            e.HasKey(x => x.CandidateId).HasName("pk_result");
            e.Property(x => x.CandidateId).HasColumnName("candidate_id").ValueGeneratedNever();
            e.Property(x => x.State).HasColumnName("state").HasDefaultValue(ResultStates.Pending);
            e.Property(x => x.DegreeBound).HasColumnName("degree_bound");
            e.Property(x => x.HeightBoundLog2).HasColumnName("height_bound_log2");
            e.Property(x => x.TrialsZero).HasColumnName("trials_zero").HasDefaultValue(0);
            e.Property(x => x.ErrorBoundLog2).HasColumnName("error_bound_log2");
            e.Property(x => x.WitnessTrialId).HasColumnName("witness_trial_id");
            e.Property(x => x.Certified).HasColumnName("certified").HasDefaultValue(false);
            e.Property(x => x.Message).HasColumnName("message");
            e.Property(x => x.UpdatedAt).HasColumnName("updated_at").HasDefaultValueSql(Now);
            e.Property(x => x.ClaimedBy).HasColumnName("claimed_by");
            e.Property(x => x.ClaimedAt).HasColumnName("claimed_at");
            e.Property(x => x.SharedFrom).HasColumnName("shared_from");
            e.HasOne<CandidateRow>().WithOne().HasForeignKey<ResultRow>(x => x.CandidateId)
                .HasConstraintName("fk_result_candidate").OnDelete(DeleteBehavior.Cascade);
            e.HasOne<TrialRow>().WithMany().HasForeignKey(x => x.WitnessTrialId)
                .HasConstraintName("fk_result_witness_trial").OnDelete(DeleteBehavior.SetNull);
            e.HasIndex(x => x.WitnessTrialId).HasDatabaseName("ix_result_witness_trial");
            // The worker's queue: pending and queued candidates in id order.
            e.HasIndex(x => new { x.State, x.CandidateId }).HasDatabaseName("ix_result_state");
        });

        modelBuilder.Entity<TrialRow>(e =>
        {
            e.ToTable("trial", t => t.HasCheckConstraint("ck_trial_outcome",
                $"outcome IN ('{TrialOutcomes.Zero}', '{TrialOutcomes.Nonzero}', '{TrialOutcomes.Undefined}')"));
            e.HasKey(x => x.Id).HasName("pk_trial");
            e.Property(x => x.Id).HasColumnName("id");
            e.Property(x => x.CandidateId).HasColumnName("candidate_id");
            e.Property(x => x.Seq).HasColumnName("seq");
            e.Property(x => x.Modulus).HasColumnName("modulus");
            e.Property(x => x.FieldBits).HasColumnName("field_bits");
            e.Property(x => x.FieldSizeLog2).HasColumnName("field_size_log2");
            e.Property(x => x.ExtensionDegree).HasColumnName("extension_degree").HasDefaultValue(1);
            e.Property(x => x.DefiningPolynomial).HasColumnName("defining_polynomial");
            e.Property(x => x.PointSeed).HasColumnName("point_seed");
            e.Property(x => x.Outcome).HasColumnName("outcome");
            e.Property(x => x.Point).HasColumnName("point");
            e.Property(x => x.Difference).HasColumnName("difference");
            e.Property(x => x.Entry).HasColumnName("entry");
            e.Property(x => x.BoundLog2).HasColumnName("bound_log2");
            e.Property(x => x.ElapsedUs).HasColumnName("elapsed_us");
            e.Property(x => x.Worker).HasColumnName("worker");
            e.Property(x => x.CreatedAt).HasColumnName("created_at").HasDefaultValueSql(Now);
            e.HasOne<CandidateRow>().WithMany().HasForeignKey(x => x.CandidateId)
                .HasConstraintName("fk_trial_candidate").OnDelete(DeleteBehavior.Cascade);
            // Also the index for "the trials of a candidate": candidate_id is its leading column.
            e.HasIndex(x => new { x.CandidateId, x.Seq }).IsUnique().HasDatabaseName("ux_trial_candidate_seq");
        });

        modelBuilder.Entity<CounterexampleRow>(e =>
        {
            e.ToTable("counterexample");
            e.HasKey(x => x.CandidateId).HasName("pk_counterexample");
            e.Property(x => x.CandidateId).HasColumnName("candidate_id").ValueGeneratedNever();
            e.Property(x => x.Point).HasColumnName("point");
            e.Property(x => x.LhsValue).HasColumnName("lhs_value");
            e.Property(x => x.RhsValue).HasColumnName("rhs_value");
            e.Property(x => x.Entry).HasColumnName("entry");
            e.Property(x => x.MaxAbs).HasColumnName("max_abs");
            e.Property(x => x.Exhaustive).HasColumnName("exhaustive");
            e.Property(x => x.PointsTried).HasColumnName("points_tried");
            e.Property(x => x.CreatedAt).HasColumnName("created_at").HasDefaultValueSql(Now);
            e.HasOne<CandidateRow>().WithOne().HasForeignKey<CounterexampleRow>(x => x.CandidateId)
                .HasConstraintName("fk_counterexample_candidate").OnDelete(DeleteBehavior.Cascade);
        });

        modelBuilder.Entity<RecoveredDifferenceRow>(e =>
        {
            e.ToTable("recovered_difference");
            e.HasKey(x => x.CandidateId).HasName("pk_recovered_difference");
            e.Property(x => x.CandidateId).HasColumnName("candidate_id").ValueGeneratedNever();
            e.Property(x => x.Difference).HasColumnName("difference");
            e.Property(x => x.Terms).HasColumnName("terms");
            e.Property(x => x.TotalDegree).HasColumnName("total_degree");
            e.Property(x => x.TermsEstimated).HasColumnName("terms_estimated");
            e.Property(x => x.CreatedAt).HasColumnName("created_at").HasDefaultValueSql(Now);
            e.HasOne<CandidateRow>().WithOne().HasForeignKey<RecoveredDifferenceRow>(x => x.CandidateId)
                .HasConstraintName("fk_recovered_difference_candidate").OnDelete(DeleteBehavior.Cascade);
        });

        modelBuilder.Entity<OpenFamilyRow>(e =>
        {
            e.ToTable("open_family");
            e.HasKey(x => x.Id).HasName("pk_open_family");
            e.Property(x => x.Id).HasColumnName("id");
            e.Property(x => x.CatalogueId).HasColumnName("catalogue_id");
            e.Property(x => x.Family).HasColumnName("family");
            e.Property(x => x.Parameter).HasColumnName("parameter");
            e.Property(x => x.FirstValue).HasColumnName("first_value");
            e.Property(x => x.Budget).HasColumnName("budget");
            e.Property(x => x.Chunk).HasColumnName("chunk");
            e.Property(x => x.Made).HasColumnName("made");
            e.HasOne<CatalogueRow>().WithMany().HasForeignKey(x => x.CatalogueId)
                .HasConstraintName("fk_open_family_catalogue").OnDelete(DeleteBehavior.Cascade);
            e.HasIndex(x => new { x.CatalogueId, x.Family }).IsUnique().HasDatabaseName("ux_open_family_catalogue_family");
        });

        modelBuilder.Entity<EquivalenceRow>(e =>
        {
            e.ToTable("equivalence");
            e.HasKey(x => x.CandidateId).HasName("pk_equivalence");
            e.Property(x => x.CandidateId).HasColumnName("candidate_id").ValueGeneratedNever();
            e.Property(x => x.GroupCandidateId).HasColumnName("group_candidate_id");
            e.Property(x => x.Swapped).HasColumnName("swapped");
            e.Property(x => x.FalseMatchBits).HasColumnName("false_match_bits");
            e.HasOne<CandidateRow>().WithOne().HasForeignKey<EquivalenceRow>(x => x.CandidateId)
                .HasConstraintName("fk_equivalence_candidate").OnDelete(DeleteBehavior.Cascade);
            e.HasOne<CandidateRow>().WithMany().HasForeignKey(x => x.GroupCandidateId)
                .HasConstraintName("fk_equivalence_group").OnDelete(DeleteBehavior.Cascade);
            e.HasIndex(x => x.GroupCandidateId).HasDatabaseName("ix_equivalence_group");
        });

        modelBuilder.Entity<VersionEntryRow>(e =>
        {
            e.ToTable("catalogue_version_entry");
            e.HasKey(x => x.Id).HasName("pk_catalogue_version_entry");
            e.Property(x => x.Id).HasColumnName("id");
            e.Property(x => x.CatalogueId).HasColumnName("catalogue_id");
            e.Property(x => x.Version).HasColumnName("version");
            e.Property(x => x.CandidateId).HasColumnName("candidate_id");
            e.Property(x => x.Label).HasColumnName("label");
            e.Property(x => x.Family).HasColumnName("family");
            e.Property(x => x.Params).HasColumnName("params");
            e.Property(x => x.Lhs).HasColumnName("lhs");
            e.Property(x => x.Rhs).HasColumnName("rhs");
            e.Property(x => x.Field).HasColumnName("field");
            e.Property(x => x.Identity).HasColumnName("identity");
            e.Property(x => x.State).HasColumnName("state");
            e.Property(x => x.ErrorBoundLog2).HasColumnName("error_bound_log2");
            e.Property(x => x.TrialsZero).HasColumnName("trials_zero");
            e.Property(x => x.ReplacedAt).HasColumnName("replaced_at").HasDefaultValueSql(Now);
            e.HasOne<CatalogueRow>().WithMany().HasForeignKey(x => x.CatalogueId)
                .HasConstraintName("fk_catalogue_version_entry_catalogue").OnDelete(DeleteBehavior.Cascade);
            e.HasIndex(x => new { x.CatalogueId, x.Version }).HasDatabaseName("ix_catalogue_version_entry_version");
        });

        modelBuilder.Entity<RejectionRow>(e =>
        {
            e.ToTable("rejection");
            e.HasKey(x => x.Id).HasName("pk_rejection");
            e.Property(x => x.Id).HasColumnName("id");
            e.Property(x => x.CatalogueId).HasColumnName("catalogue_id");
            e.Property(x => x.Source).HasColumnName("source");
            e.Property(x => x.Line).HasColumnName("line");
            e.Property(x => x.Raw).HasColumnName("raw");
            e.Property(x => x.Reason).HasColumnName("reason");
            e.HasOne<CatalogueRow>().WithMany().HasForeignKey(x => x.CatalogueId)
                .HasConstraintName("fk_rejection_catalogue").OnDelete(DeleteBehavior.Cascade);
            e.HasIndex(x => new { x.CatalogueId, x.Line }).HasDatabaseName("ix_rejection_catalogue_line");
        });

        modelBuilder.Entity<WorkerRow>(e =>
        {
            e.ToTable("worker");
            e.HasKey(x => x.Name).HasName("pk_worker");
            e.Property(x => x.Name).HasColumnName("name");
            e.Property(x => x.Host).HasColumnName("host");
            e.Property(x => x.Pid).HasColumnName("pid");
            e.Property(x => x.Threads).HasColumnName("threads");
            e.Property(x => x.StartedAt).HasColumnName("started_at").HasDefaultValueSql(Now);
            e.Property(x => x.HeartbeatAt).HasColumnName("heartbeat_at").HasDefaultValueSql(Now);
            e.Property(x => x.ChunksDone).HasColumnName("chunks_done").HasDefaultValue(0L);
            e.Property(x => x.CandidatesDone).HasColumnName("candidates_done").HasDefaultValue(0L);
            e.Property(x => x.CurrentCandidateId).HasColumnName("current_candidate_id");
            e.Property(x => x.CurrentSince).HasColumnName("current_since");
            e.Property(x => x.StoppedAt).HasColumnName("stopped_at");
        });
    }
}
