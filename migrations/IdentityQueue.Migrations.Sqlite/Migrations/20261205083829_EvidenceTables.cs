using System;
using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.Sqlite.Migrations
{
    /// <summary>
    /// The evidence a researcher acts on: the smallest integer counterexample of a refuted candidate (<c>counterexample</c>,
    /// view <c>counterexamples</c>), its recovered difference (<c>recovered_difference</c>, view <c>differences</c>), and the
    /// groups of candidates that are the same identity written differently (<c>equivalence</c>, view <c>equivalents</c>).
    /// </summary>
    public partial class EvidenceTables : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.CreateTable(
                name: "counterexample",
                columns: table => new
                {
                    candidate_id = table.Column<long>(type: "INTEGER", nullable: false),
                    point = table.Column<string>(type: "TEXT", nullable: false),
                    lhs_value = table.Column<string>(type: "TEXT", nullable: false),
                    rhs_value = table.Column<string>(type: "TEXT", nullable: false),
                    entry = table.Column<string>(type: "TEXT", nullable: true),
                    max_abs = table.Column<long>(type: "INTEGER", nullable: false),
                    exhaustive = table.Column<bool>(type: "INTEGER", nullable: false),
                    points_tried = table.Column<long>(type: "INTEGER", nullable: false),
                    created_at = table.Column<DateTime>(type: "TEXT", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP")
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_counterexample", x => x.candidate_id);
                    table.ForeignKey(
                        name: "fk_counterexample_candidate",
                        column: x => x.candidate_id,
                        principalTable: "candidate",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateTable(
                name: "equivalence",
                columns: table => new
                {
                    candidate_id = table.Column<long>(type: "INTEGER", nullable: false),
                    group_candidate_id = table.Column<long>(type: "INTEGER", nullable: false),
                    swapped = table.Column<bool>(type: "INTEGER", nullable: false)
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_equivalence", x => x.candidate_id);
                    table.ForeignKey(
                        name: "fk_equivalence_candidate",
                        column: x => x.candidate_id,
                        principalTable: "candidate",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                    table.ForeignKey(
                        name: "fk_equivalence_group",
                        column: x => x.group_candidate_id,
                        principalTable: "candidate",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateTable(
                name: "recovered_difference",
                columns: table => new
                {
                    candidate_id = table.Column<long>(type: "INTEGER", nullable: false),
                    difference = table.Column<string>(type: "TEXT", nullable: true),
                    terms = table.Column<long>(type: "INTEGER", nullable: true),
                    total_degree = table.Column<int>(type: "INTEGER", nullable: true),
                    terms_estimated = table.Column<bool>(type: "INTEGER", nullable: false),
                    created_at = table.Column<DateTime>(type: "TEXT", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP")
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_recovered_difference", x => x.candidate_id);
                    table.ForeignKey(
                        name: "fk_recovered_difference_candidate",
                        column: x => x.candidate_id,
                        principalTable: "candidate",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateIndex(
                name: "ix_equivalence_group",
                table: "equivalence",
                column: "group_candidate_id");

            migrationBuilder.Sql("""
                CREATE VIEW counterexamples AS
                SELECT x.candidate_id AS candidate_id, c.label AS label, x.point AS point, x.lhs_value AS lhs_value,
                       x.rhs_value AS rhs_value, x.max_abs AS max_abs, CASE WHEN x.exhaustive THEN 1 ELSE 0 END AS exhaustive,
                       x.entry AS entry, x.points_tried AS points_tried
                FROM counterexample x JOIN candidate c ON c.id = x.candidate_id
                """);
            migrationBuilder.Sql("""
                CREATE VIEW differences AS
                SELECT d.candidate_id AS candidate_id, c.label AS label, d.difference AS difference, d.terms AS terms,
                       d.total_degree AS total_degree, CASE WHEN d.terms_estimated THEN 1 ELSE 0 END AS terms_estimated
                FROM recovered_difference d JOIN candidate c ON c.id = d.candidate_id
                """);
            migrationBuilder.Sql("""
                CREATE VIEW equivalents AS
                SELECT e.candidate_id AS candidate_id, c.label AS label, g.label AS group_label, e.group_candidate_id AS group_candidate_id,
                       CASE WHEN e.swapped THEN 1 ELSE 0 END AS swapped
                FROM equivalence e JOIN candidate c ON c.id = e.candidate_id JOIN candidate g ON g.id = e.group_candidate_id
                """);
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.Sql("DROP VIEW equivalents");
            migrationBuilder.Sql("DROP VIEW differences");
            migrationBuilder.Sql("DROP VIEW counterexamples");

            migrationBuilder.DropTable(
                name: "counterexample");

            migrationBuilder.DropTable(
                name: "equivalence");

            migrationBuilder.DropTable(
                name: "recovered_difference");
        }
    }
}
