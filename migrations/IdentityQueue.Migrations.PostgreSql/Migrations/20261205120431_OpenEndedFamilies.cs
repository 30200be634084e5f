using Microsoft.EntityFrameworkCore.Migrations;
using Npgsql.EntityFrameworkCore.PostgreSQL.Metadata;

#nullable disable

namespace IdentityQueue.Migrations.PostgreSql.Migrations
{
    /// <summary>
    /// Open-ended families (<c>for n &gt;= A</c>): the table <c>open_family</c> (the open family budget each was imported
    /// with, and how many instances exist), and three columns added at the end of the families view: <c>open_ended</c>
    /// (1/0), <c>open_budget</c>, and <c>open_stop</c>, why it stopped growing (<c>first refuted at n = 6</c>, <c>budget of 64
    /// instances reached</c>), null while it can still grow or for a closed family.
    /// </summary>
    public partial class OpenEndedFamilies : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.CreateTable(
                name: "open_family",
                columns: table => new
                {
                    id = table.Column<long>(type: "bigint", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    catalogue_id = table.Column<long>(type: "bigint", nullable: false),
                    family = table.Column<string>(type: "text", nullable: false),
                    parameter = table.Column<string>(type: "text", nullable: false),
                    first_value = table.Column<long>(type: "bigint", nullable: false),
                    budget = table.Column<int>(type: "integer", nullable: false),
                    chunk = table.Column<int>(type: "integer", nullable: false),
                    made = table.Column<int>(type: "integer", nullable: false)
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_open_family", x => x.id);
                    table.ForeignKey(
                        name: "fk_open_family_catalogue",
                        column: x => x.catalogue_id,
                        principalTable: "catalogue",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateIndex(
                name: "ux_open_family_catalogue_family",
                table: "open_family",
                columns: new[] { "catalogue_id", "family" },
                unique: true);

            migrationBuilder.Sql("DROP VIEW families");
            migrationBuilder.Sql("""
                CREATE VIEW families AS
                WITH inst AS (
                    SELECT c.catalogue_id, c.family, c.id,
                           substring(c.params from '^\s*\{\s*"[^"]*"\s*:\s*(-?[0-9]+)\s*\}\s*$') AS v,
                           CASE r.state WHEN 'survived' THEN 's' WHEN 'refuted' THEN 'r' ELSE 'o' END AS st
                      FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
                     WHERE c.family IS NOT NULL),
                numbered AS (
                    SELECT *, ROW_NUMBER() OVER (PARTITION BY catalogue_id, family ORDER BY v::numeric, id)
                            - ROW_NUMBER() OVER (PARTITION BY catalogue_id, family, st ORDER BY v::numeric, id) AS island
                      FROM inst WHERE v IS NOT NULL),
                runs AS (
                    SELECT catalogue_id, family, st, MIN(v::numeric) AS lo, MAX(v::numeric) AS hi
                      FROM numbered GROUP BY catalogue_id, family, st, island),
                ranges AS (
                    SELECT catalogue_id, family,
                           string_agg(CASE WHEN st = 's' THEN CASE WHEN lo = hi THEN lo::text ELSE lo::text || '..' || hi::text END END, ', ' ORDER BY lo) AS holds_for,
                           string_agg(CASE WHEN st = 'r' THEN CASE WHEN lo = hi THEN lo::text ELSE lo::text || '..' || hi::text END END, ', ' ORDER BY lo) AS fails_for
                      FROM runs o
                     GROUP BY catalogue_id, family
                    HAVING (SELECT COUNT(*) FROM inst i WHERE i.catalogue_id = o.catalogue_id AND i.family = o.family AND i.v IS NULL) = 0)
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
                       c.catalogue_id AS catalogue_id,
                       (SELECT g.holds_for FROM ranges g WHERE g.catalogue_id = c.catalogue_id AND g.family = c.family) AS holds_for,
                       (SELECT g.fails_for FROM ranges g WHERE g.catalogue_id = c.catalogue_id AND g.family = c.family) AS fails_for,
                       CASE WHEN o.id IS NULL THEN 0 ELSE 1 END AS open_ended,
                       o.budget AS open_budget,
                       CASE WHEN o.id IS NULL THEN NULL
                            WHEN SUM(CASE WHEN r.state = 'refuted' THEN 1 ELSE 0 END) > 0
                            THEN 'first refuted at ' || o.parameter || ' = '
                                 || (SELECT MIN(i.v::numeric)::text FROM inst i
                                      WHERE i.catalogue_id = c.catalogue_id AND i.family = c.family AND i.st = 'r')
                            WHEN o.made >= o.budget
                                 AND SUM(CASE WHEN r.state IS NULL OR r.state IN ('pending', 'queued', 'screening') THEN 1 ELSE 0 END) = 0
                            THEN 'budget of ' || o.budget::text || ' instances reached'
                       END AS open_stop
                FROM candidate c
                JOIN catalogue k ON k.id = c.catalogue_id
                LEFT JOIN result r ON r.candidate_id = c.id
                LEFT JOIN open_family o ON o.catalogue_id = c.catalogue_id AND o.family = c.family
                WHERE c.family IS NOT NULL
                GROUP BY c.catalogue_id, k.name, c.family, o.id, o.budget, o.made, o.parameter
                """);
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.Sql("DROP VIEW families");
            migrationBuilder.Sql("""
                CREATE VIEW families AS
                WITH inst AS (
                    SELECT c.catalogue_id, c.family, c.id,
                           substring(c.params from '^\s*\{\s*"[^"]*"\s*:\s*(-?[0-9]+)\s*\}\s*$') AS v,
                           CASE r.state WHEN 'survived' THEN 's' WHEN 'refuted' THEN 'r' ELSE 'o' END AS st
                      FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
                     WHERE c.family IS NOT NULL),
                numbered AS (
                    SELECT *, ROW_NUMBER() OVER (PARTITION BY catalogue_id, family ORDER BY v::numeric, id)
                            - ROW_NUMBER() OVER (PARTITION BY catalogue_id, family, st ORDER BY v::numeric, id) AS island
                      FROM inst WHERE v IS NOT NULL),
                runs AS (
                    SELECT catalogue_id, family, st, MIN(v::numeric) AS lo, MAX(v::numeric) AS hi
                      FROM numbered GROUP BY catalogue_id, family, st, island),
                ranges AS (
                    SELECT catalogue_id, family,
                           string_agg(CASE WHEN st = 's' THEN CASE WHEN lo = hi THEN lo::text ELSE lo::text || '..' || hi::text END END, ', ' ORDER BY lo) AS holds_for,
                           string_agg(CASE WHEN st = 'r' THEN CASE WHEN lo = hi THEN lo::text ELSE lo::text || '..' || hi::text END END, ', ' ORDER BY lo) AS fails_for
                      FROM runs o
                     GROUP BY catalogue_id, family
                    HAVING (SELECT COUNT(*) FROM inst i WHERE i.catalogue_id = o.catalogue_id AND i.family = o.family AND i.v IS NULL) = 0)
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
                       c.catalogue_id AS catalogue_id,
                       (SELECT g.holds_for FROM ranges g WHERE g.catalogue_id = c.catalogue_id AND g.family = c.family) AS holds_for,
                       (SELECT g.fails_for FROM ranges g WHERE g.catalogue_id = c.catalogue_id AND g.family = c.family) AS fails_for
                FROM candidate c
                JOIN catalogue k ON k.id = c.catalogue_id
                LEFT JOIN result r ON r.candidate_id = c.id
                WHERE c.family IS NOT NULL
                GROUP BY c.catalogue_id, k.name, c.family
                """);

            migrationBuilder.DropTable(
                name: "open_family");
        }
    }
}
