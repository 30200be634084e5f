using System;
using Microsoft.EntityFrameworkCore.Migrations;
using Npgsql.EntityFrameworkCore.PostgreSQL.Metadata;

#nullable disable

namespace IdentityQueue.Migrations.PostgreSql.Migrations
{
    /// <inheritdoc />
    public partial class InitialStore : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.CreateTable(
                name: "catalogue",
                columns: table => new
                {
                    id = table.Column<long>(type: "bigint", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    name = table.Column<string>(type: "text", nullable: false),
                    source = table.Column<string>(type: "text", nullable: true),
                    imported_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP"),
                    seed = table.Column<long>(type: "bigint", nullable: false, defaultValue: 0L),
                    target_bits = table.Column<int>(type: "integer", nullable: false, defaultValue: 64),
                    entries = table.Column<int>(type: "integer", nullable: true),
                    instances = table.Column<int>(type: "integer", nullable: true),
                    rejections = table.Column<int>(type: "integer", nullable: true)
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_catalogue", x => x.id);
                });

            migrationBuilder.CreateTable(
                name: "worker",
                columns: table => new
                {
                    name = table.Column<string>(type: "text", nullable: false),
                    host = table.Column<string>(type: "text", nullable: false),
                    pid = table.Column<int>(type: "integer", nullable: false),
                    threads = table.Column<int>(type: "integer", nullable: false),
                    started_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP"),
                    heartbeat_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP"),
                    chunks_done = table.Column<long>(type: "bigint", nullable: false, defaultValue: 0L),
                    candidates_done = table.Column<long>(type: "bigint", nullable: false, defaultValue: 0L),
                    stopped_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: true)
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_worker", x => x.name);
                });

            migrationBuilder.CreateTable(
                name: "candidate",
                columns: table => new
                {
                    id = table.Column<long>(type: "bigint", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    catalogue_id = table.Column<long>(type: "bigint", nullable: false),
                    label = table.Column<string>(type: "text", nullable: false),
                    family = table.Column<string>(type: "text", nullable: true),
                    @params = table.Column<string>(name: "params", type: "text", nullable: true),
                    lhs = table.Column<string>(type: "text", nullable: false),
                    rhs = table.Column<string>(type: "text", nullable: false),
                    field = table.Column<string>(type: "text", nullable: false, defaultValue: "Q"),
                    created_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP"),
                    position = table.Column<int>(type: "integer", nullable: true)
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_candidate", x => x.id);
                    table.ForeignKey(
                        name: "fk_candidate_catalogue",
                        column: x => x.catalogue_id,
                        principalTable: "catalogue",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateTable(
                name: "rejection",
                columns: table => new
                {
                    id = table.Column<long>(type: "bigint", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    catalogue_id = table.Column<long>(type: "bigint", nullable: false),
                    source = table.Column<string>(type: "text", nullable: false),
                    line = table.Column<int>(type: "integer", nullable: false),
                    raw = table.Column<string>(type: "text", nullable: false),
                    reason = table.Column<string>(type: "text", nullable: false)
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_rejection", x => x.id);
                    table.ForeignKey(
                        name: "fk_rejection_catalogue",
                        column: x => x.catalogue_id,
                        principalTable: "catalogue",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateTable(
                name: "trial",
                columns: table => new
                {
                    id = table.Column<long>(type: "bigint", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    candidate_id = table.Column<long>(type: "bigint", nullable: false),
                    seq = table.Column<int>(type: "integer", nullable: false),
                    modulus = table.Column<string>(type: "text", nullable: false),
                    field_bits = table.Column<int>(type: "integer", nullable: false),
                    field_size_log2 = table.Column<double>(type: "double precision", nullable: false),
                    extension_degree = table.Column<int>(type: "integer", nullable: false, defaultValue: 1),
                    defining_polynomial = table.Column<string>(type: "text", nullable: true),
                    point_seed = table.Column<string>(type: "text", nullable: false),
                    outcome = table.Column<string>(type: "text", nullable: false),
                    point = table.Column<string>(type: "text", nullable: false),
                    difference = table.Column<string>(type: "text", nullable: true),
                    entry = table.Column<string>(type: "text", nullable: true),
                    bound_log2 = table.Column<double>(type: "double precision", nullable: true),
                    elapsed_us = table.Column<long>(type: "bigint", nullable: false),
                    worker = table.Column<string>(type: "text", nullable: true),
                    created_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP")
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_trial", x => x.id);
                    table.CheckConstraint("ck_trial_outcome", "outcome IN ('zero', 'nonzero', 'undefined')");
                    table.ForeignKey(
                        name: "fk_trial_candidate",
                        column: x => x.candidate_id,
                        principalTable: "candidate",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateTable(
                name: "result",
                columns: table => new
                {
                    candidate_id = table.Column<long>(type: "bigint", nullable: false),
                    state = table.Column<string>(type: "text", nullable: false, defaultValue: "pending"),
                    degree_bound = table.Column<string>(type: "text", nullable: true),
                    height_bound_log2 = table.Column<double>(type: "double precision", nullable: true),
                    trials_zero = table.Column<int>(type: "integer", nullable: false, defaultValue: 0),
                    error_bound_log2 = table.Column<double>(type: "double precision", nullable: true),
                    witness_trial_id = table.Column<long>(type: "bigint", nullable: true),
                    certified = table.Column<bool>(type: "boolean", nullable: false, defaultValue: false),
                    message = table.Column<string>(type: "text", nullable: true),
                    updated_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP"),
                    claimed_by = table.Column<string>(type: "text", nullable: true),
                    claimed_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: true)
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_result", x => x.candidate_id);
                    table.CheckConstraint("ck_result_state", "state IN ('pending', 'queued', 'screening', 'refuted', 'survived', 'undecided', 'invalid', 'failed')");
                    table.ForeignKey(
                        name: "fk_result_candidate",
                        column: x => x.candidate_id,
                        principalTable: "candidate",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                    table.ForeignKey(
                        name: "fk_result_witness_trial",
                        column: x => x.witness_trial_id,
                        principalTable: "trial",
                        principalColumn: "id",
                        onDelete: ReferentialAction.SetNull);
                });

            migrationBuilder.CreateIndex(
                name: "ix_candidate_catalogue_family",
                table: "candidate",
                columns: new[] { "catalogue_id", "family", "position" });

            migrationBuilder.CreateIndex(
                name: "ix_candidate_label",
                table: "candidate",
                column: "label");

            migrationBuilder.CreateIndex(
                name: "ux_catalogue_name",
                table: "catalogue",
                column: "name",
                unique: true);

            migrationBuilder.CreateIndex(
                name: "ix_rejection_catalogue_line",
                table: "rejection",
                columns: new[] { "catalogue_id", "line" });

            migrationBuilder.CreateIndex(
                name: "ix_result_state",
                table: "result",
                columns: new[] { "state", "candidate_id" });

            migrationBuilder.CreateIndex(
                name: "ix_result_witness_trial",
                table: "result",
                column: "witness_trial_id");

            migrationBuilder.CreateIndex(
                name: "ux_trial_candidate_seq",
                table: "trial",
                columns: new[] { "candidate_id", "seq" },
                unique: true);

            // The views of SPEC §4: the same SQL as the SQLite migration's but for the one aggregate that differs
            // (string_agg with ORDER BY instead of group_concat over an ordered subquery), so both stores give the same rows.
            // A candidate without a result row yet (inserted by hand) shows as 'pending'.
            migrationBuilder.Sql("""
                CREATE VIEW verdicts AS
                SELECT c.id AS candidate_id,
                       k.name AS catalogue,
                       c.label AS label,
                       c.family AS family,
                       COALESCE(r.state, 'pending') AS state,
                       r.degree_bound AS degree_bound,
                       (SELECT COUNT(*) FROM trial t WHERE t.candidate_id = c.id) AS trials,
                       r.error_bound_log2 AS error_bound_log2,
                       w.modulus AS witness_modulus,
                       w.point AS witness_point,
                       r.message AS message,
                       c.params AS params,
                       c.field AS field,
                       w.difference AS witness_difference,
                       r.certified AS certified
                FROM candidate c
                JOIN catalogue k ON k.id = c.catalogue_id
                LEFT JOIN result r ON r.candidate_id = c.id
                LEFT JOIN trial w ON w.id = r.witness_trial_id
                """);

            // Strongest evidence first: the most negative log2 error bound. SQLite and PostgreSQL both keep the ORDER BY
            // of a view for a plain SELECT from it.
            migrationBuilder.Sql("""
                CREATE VIEW survivors AS
                SELECT candidate_id, catalogue, label, family, state, degree_bound, trials, error_bound_log2,
                       witness_modulus, witness_point, message, params, field
                FROM verdicts
                WHERE state = 'survived'
                ORDER BY error_bound_log2 ASC, candidate_id ASC
                """);

            // One row per (catalogue, family). Instances are in expansion order: candidate.position (the file line), then id.
            migrationBuilder.Sql("""
                CREATE VIEW families AS
                SELECT k.name AS catalogue,
                       c.family AS family,
                       COUNT(*) AS instances,
                       SUM(CASE WHEN r.state = 'survived' THEN 1 ELSE 0 END) AS survived,
                       SUM(CASE WHEN r.state = 'refuted' THEN 1 ELSE 0 END) AS refuted,
                       SUM(CASE WHEN r.state IS NULL OR r.state NOT IN ('survived', 'refuted') THEN 1 ELSE 0 END) AS other,
                       (SELECT f.params
                          FROM candidate f JOIN result fr ON fr.candidate_id = f.id
                         WHERE f.catalogue_id = c.catalogue_id AND f.family = c.family AND fr.state = 'refuted'
                         ORDER BY f.position, f.id
                         LIMIT 1) AS first_refuted,
                       (SELECT string_agg(sc.params, ', ' ORDER BY sc.position, sc.id)
                          FROM candidate sc JOIN result sr ON sr.candidate_id = sc.id
                         WHERE sc.catalogue_id = c.catalogue_id AND sc.family = c.family AND sr.state = 'survived') AS survived_params,
                       c.catalogue_id AS catalogue_id
                FROM candidate c
                JOIN catalogue k ON k.id = c.catalogue_id
                LEFT JOIN result r ON r.candidate_id = c.id
                WHERE c.family IS NOT NULL
                GROUP BY c.catalogue_id, k.name, c.family
                """);
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.Sql("DROP VIEW families");
            migrationBuilder.Sql("DROP VIEW survivors");
            migrationBuilder.Sql("DROP VIEW verdicts");

            migrationBuilder.DropTable(
                name: "rejection");

            migrationBuilder.DropTable(
                name: "result");

            migrationBuilder.DropTable(
                name: "worker");

            migrationBuilder.DropTable(
                name: "trial");

            migrationBuilder.DropTable(
                name: "candidate");

            migrationBuilder.DropTable(
                name: "catalogue");
        }
    }
}
