using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.Sqlite.Migrations
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
                    id = table.Column<long>(type: "INTEGER", nullable: false)
                        .Annotation("Sqlite:Autoincrement", true),
                    catalogue_id = table.Column<long>(type: "INTEGER", nullable: false),
                    family = table.Column<string>(type: "TEXT", nullable: false),
                    parameter = table.Column<string>(type: "TEXT", nullable: false),
                    first_value = table.Column<long>(type: "INTEGER", nullable: false),
                    budget = table.Column<int>(type: "INTEGER", nullable: false),
                    chunk = table.Column<int>(type: "INTEGER", nullable: false),
                    made = table.Column<int>(type: "INTEGER", nullable: false)
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
                           (SELECT COUNT(*) FROM json_each(c.params)) AS keys,
                           (SELECT j.value FROM json_each(c.params) j LIMIT 1) AS v,
                           CASE r.state WHEN 'survived' THEN 's' WHEN 'refuted' THEN 'r' ELSE 'o' END AS st
                      FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
                     WHERE c.family IS NOT NULL AND json_valid(c.params)),
                numbered AS (
                    SELECT *, ROW_NUMBER() OVER (PARTITION BY catalogue_id, family ORDER BY CAST(v AS INTEGER), id)
                            - ROW_NUMBER() OVER (PARTITION BY catalogue_id, family, st ORDER BY CAST(v AS INTEGER), id) AS island
                      FROM inst),
                runs AS (
                    SELECT catalogue_id, family, st, MIN(CAST(v AS INTEGER)) AS lo, MAX(CAST(v AS INTEGER)) AS hi
                      FROM numbered GROUP BY catalogue_id, family, st, island),
                ranges AS (
                    SELECT catalogue_id, family,
                           group_concat(CASE WHEN st = 's' THEN text END, ', ') AS holds_for,
                           group_concat(CASE WHEN st = 'r' THEN text END, ', ') AS fails_for
                      FROM (SELECT catalogue_id, family, st, CASE WHEN lo = hi THEN CAST(lo AS TEXT) ELSE lo || '..' || hi END AS text
                              FROM runs ORDER BY catalogue_id, family, lo) o
                     GROUP BY catalogue_id, family
                    HAVING (SELECT MAX(keys) FROM inst i WHERE i.catalogue_id = o.catalogue_id AND i.family = o.family) = 1)
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
                       (SELECT group_concat(s.params, ', ')
                          FROM (SELECT sc.params
                                  FROM candidate sc JOIN result sr ON sr.candidate_id = sc.id
                                 WHERE sc.catalogue_id = c.catalogue_id AND sc.family = c.family AND sr.state = 'survived'
                                 ORDER BY sc.position, sc.id) s) AS survived_params,
                       c.catalogue_id AS catalogue_id,
                       (SELECT g.holds_for FROM ranges g WHERE g.catalogue_id = c.catalogue_id AND g.family = c.family) AS holds_for,
                       (SELECT g.fails_for FROM ranges g WHERE g.catalogue_id = c.catalogue_id AND g.family = c.family) AS fails_for,
                       CASE WHEN o.id IS NULL THEN 0 ELSE 1 END AS open_ended,
                       o.budget AS open_budget,
                       CASE WHEN o.id IS NULL THEN NULL
                            WHEN SUM(CASE WHEN r.state = 'refuted' THEN 1 ELSE 0 END) > 0
                            THEN 'first refuted at ' || o.parameter || ' = '
                                 || (SELECT CAST(MIN(CAST(i.v AS INTEGER)) AS TEXT) FROM inst i
                                      WHERE i.catalogue_id = c.catalogue_id AND i.family = c.family AND i.st = 'r')
                            WHEN o.made >= o.budget
                                 AND SUM(CASE WHEN r.state IS NULL OR r.state IN ('pending', 'queued', 'screening') THEN 1 ELSE 0 END) = 0
                            THEN 'budget of ' || CAST(o.budget AS TEXT) || ' instances reached'
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
                           (SELECT COUNT(*) FROM json_each(c.params)) AS keys,
                           (SELECT j.value FROM json_each(c.params) j LIMIT 1) AS v,
                           CASE r.state WHEN 'survived' THEN 's' WHEN 'refuted' THEN 'r' ELSE 'o' END AS st
                      FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
                     WHERE c.family IS NOT NULL AND json_valid(c.params)),
                numbered AS (
                    SELECT *, ROW_NUMBER() OVER (PARTITION BY catalogue_id, family ORDER BY CAST(v AS INTEGER), id)
                            - ROW_NUMBER() OVER (PARTITION BY catalogue_id, family, st ORDER BY CAST(v AS INTEGER), id) AS island
                      FROM inst),
                runs AS (
                    SELECT catalogue_id, family, st, MIN(CAST(v AS INTEGER)) AS lo, MAX(CAST(v AS INTEGER)) AS hi
                      FROM numbered GROUP BY catalogue_id, family, st, island),
                ranges AS (
                    SELECT catalogue_id, family,
                           group_concat(CASE WHEN st = 's' THEN text END, ', ') AS holds_for,
                           group_concat(CASE WHEN st = 'r' THEN text END, ', ') AS fails_for
                      FROM (SELECT catalogue_id, family, st, CASE WHEN lo = hi THEN CAST(lo AS TEXT) ELSE lo || '..' || hi END AS text
                              FROM runs ORDER BY catalogue_id, family, lo) o
                     GROUP BY catalogue_id, family
                    HAVING (SELECT MAX(keys) FROM inst i WHERE i.catalogue_id = o.catalogue_id AND i.family = o.family) = 1)
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
                       (SELECT group_concat(s.params, ', ')
                          FROM (SELECT sc.params
                                  FROM candidate sc JOIN result sr ON sr.candidate_id = sc.id
                                 WHERE sc.catalogue_id = c.catalogue_id AND sc.family = c.family AND sr.state = 'survived'
                                 ORDER BY sc.position, sc.id) s) AS survived_params,
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
