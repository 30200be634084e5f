using System;
using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.Sqlite.Migrations
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
                type: "INTEGER",
                nullable: true);

            migrationBuilder.AddColumn<DateTime>(
                name: "current_since",
                table: "worker",
                type: "TEXT",
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
