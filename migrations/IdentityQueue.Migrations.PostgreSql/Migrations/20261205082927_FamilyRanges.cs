using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.PostgreSql.Migrations
{
    /// <summary>
    /// The families view gains <c>holds_for</c> and <c>fails_for</c>: for a family in one parameter, the values whose
    /// instances survived (were refuted) as runs of consecutive instances in parameter order, <c>0..5</c>, <c>6..10</c>
    /// (null for a family in several parameters, or when none).
    /// </summary>
    public partial class FamilyRanges : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
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
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.Sql("DROP VIEW families");
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
    }
}
