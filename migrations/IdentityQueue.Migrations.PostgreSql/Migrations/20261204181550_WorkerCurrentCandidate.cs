using System;
using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.PostgreSql.Migrations
{
    /// <inheritdoc />
    public partial class WorkerCurrentCandidate : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AddColumn<long>(
                name: "current_candidate_id",
                table: "worker",
                type: "bigint",
                nullable: true);

            migrationBuilder.AddColumn<DateTime>(
                name: "current_since",
                table: "worker",
                type: "timestamp with time zone",
                nullable: true);
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropColumn(
                name: "current_candidate_id",
                table: "worker");

            migrationBuilder.DropColumn(
                name: "current_since",
                table: "worker");
        }
    }
}
